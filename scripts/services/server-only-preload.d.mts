/* Side-effect module: registers the resolve hook described in server-only-preload.mjs. */
export {};
