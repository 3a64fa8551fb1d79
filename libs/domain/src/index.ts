export * from './roles';
export * from './house-layout';
export * from './clock';
export * from './running-totals';
