/**
 * zod's locales table as the web bundle gets it (metro.config.js): English only. `z.locales.en`
 * works as before; no other language is used by Trimout.
 */
export { default as en } from 'zod/v4/locales/en.js';
