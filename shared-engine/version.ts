/** The engine version, recorded in results and design-sheet fingerprints. Bump on any change
 * that can alter a computed number. */
export const ENGINE_VERSION = "0.1.0";
