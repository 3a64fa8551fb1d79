export * as schema from './schema/index';
export * from './client';
export * from './migrate';
export * from './house-records';
export * from './hens-alive';
