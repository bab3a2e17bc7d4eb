/*
 * The settings, as lib/ reads them. They live in config/env.ts, below every layer, so db/ (the pool)
 * and next.config.ts read the same validated settings without importing lib/.
 */
export * from '../config/env';
