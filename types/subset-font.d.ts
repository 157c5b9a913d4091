declare module 'subset-font' {
  type Options = { targetFormat?: 'sfnt' | 'truetype' | 'woff' | 'woff2'; keepFeatures?: string[]; noHinting?: boolean };
  export default function subsetFont(font: Buffer, text: string, options?: Options): Promise<Buffer>;
}
