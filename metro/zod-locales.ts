// What the web bundle gets for zod's table of message languages: English only. The app shows
// its own words for every error it can name and never switches zod's language, and the other
// fifty languages were a quarter of the bundle's first screen.
export { default as en } from 'zod/v4/locales/en.js';
