// Svelte settings for the app (src/app): runes everywhere, component CSS emitted as files
// so that the page's Content-Security-Policy can forbid inline styles.
export default {
  compilerOptions: { runes: true },
};
