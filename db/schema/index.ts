// One file per area; each new area adds its file and one line here.
export * from './core';
export * from './catalog';
export * from './planning';
export * from './mail';
export * from './billing';
export * from './quality';
export * from './change-control';
export * from './batches';
export * from './calibration';
export * from './control-link';
