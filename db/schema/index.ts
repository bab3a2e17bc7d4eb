export * from './users';
export * from './master-data';
export * from './records';
export * from './mail';
export * from './deviations';
export * from './capa';
export * from './complaints';
export * from './quality';
