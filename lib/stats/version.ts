/** Bumped whenever a change to lib/stats can change a reported number; stored with every result. */
export const ENGINE_VERSION = "1.1.1";
