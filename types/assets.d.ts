/** Metro turns an imported font or image into an asset id (a number on native, a URL object on web). */
declare module '*.ttf' {
  const asset: number;
  export default asset;
}
declare module '*.png' {
  const asset: number;
  export default asset;
}
declare module '*.woff2' {
  const asset: number;
  export default asset;
}
