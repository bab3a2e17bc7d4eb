/* Weight checks of hard capsules: pure computations, importable from server and client alike. */
export * from './stats';
export * from './ph-eur-2-9-5';
export * from './usp-905';
export * from './usp-2091';
export * from './control-chart';
export * from './parse';
export * from './fill-planning';
export * from './hints';
export * from './evaluate';
