export type PhotoImageProps = {
  uri: string;
  /** Read out in place of the picture. */
  label: string;
  fit?: 'cover' | 'contain';
  testID?: string;
  onLoad?: () => void;
};
