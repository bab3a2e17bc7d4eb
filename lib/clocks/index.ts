export * from './dates';
export * from './holidays';
export * from './business-days';
export * from './due-dates';
export * from './regulatory';
export * from './retention';
export * from './closure-id';
