/** The engine's version, stored with every computed figure and verification record. */
export const ENGINE_VERSION = "1.0.0";
