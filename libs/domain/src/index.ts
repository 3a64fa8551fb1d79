export * from './roles';
export * from './house-layout';
export * from './clock';
export * from './running-totals';
export * from './production-day';
