/**
 * The web bundle's stand-in for zod's `locales` namespace (metro.config.js points zod's
 * `../locales/index.js` here on the web only). zod re-exports all of its ~40 message languages
 * through it, ~300 kB of script the first screen would load; Quasilevel writes its own messages
 * (lib/schemas) and uses zod's English default only, which zod imports on its own.
 */
export { default as en } from 'zod/v4/locales/en.js';
