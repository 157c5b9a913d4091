import * as ImagePicker from 'expo-image-picker';

import type { PickedFile } from '@/hooks/photo-upload';
import { photoLimits } from '@/lib/schemas';

export class PickerRefused extends Error {}

function toPicked(asset: ImagePicker.ImagePickerAsset, index: number): PickedFile {
  const mime = asset.mimeType ?? 'image/jpeg';
  return {
    name: asset.fileName ?? `photo-${index + 1}.${mime.split('/')[1] ?? 'jpg'}`,
    mime,
    size: asset.fileSize ?? asset.file?.size,
    previewUri: asset.uri,
    file: asset.file,
    uri: asset.uri,
  };
}

/**
 * Opens the photo library (several at once) or the camera. The capture time is read by the
 * server from the file itself, so the picker's own EXIF copy is not asked for.
 */
export async function pickPhotos(source: 'library' | 'camera'): Promise<PickedFile[]> {
  if (source === 'camera') {
    const permission = await ImagePicker.requestCameraPermissionsAsync();
    if (!permission.granted) throw new PickerRefused('Bathynote may not use the camera. Allow it in the device settings.');
    const result = await ImagePicker.launchCameraAsync({ mediaTypes: ['images'], quality: 1 });
    return result.canceled ? [] : result.assets.map(toPicked);
  }
  const permission = await ImagePicker.requestMediaLibraryPermissionsAsync();
  if (!permission.granted) throw new PickerRefused('Bathynote may not read your photos. Allow it in the device settings.');
  const result = await ImagePicker.launchImageLibraryAsync({
    mediaTypes: ['images'],
    allowsMultipleSelection: true,
    selectionLimit: photoLimits.maxFiles,
    quality: 1,
  });
  return result.canceled ? [] : result.assets.map(toPicked);
}

/** Files dropped or pasted in a browser, as the upload queue takes them. */
export function pickedFromFiles(files: Iterable<File>): PickedFile[] {
  return [...files]
    .filter((f) => f.type === '' || f.type.startsWith('image/'))
    .map((f) => ({ name: f.name, mime: f.type || 'application/octet-stream', size: f.size, previewUri: URL.createObjectURL(f), file: f }));
}
