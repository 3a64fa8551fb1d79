export * from './roles';
export * from './house-layout';
export * from './clock';
export * from './running-totals';
export * from './production-day';
export * from './statistics';
export * from './windows';
export * from './shortfall';
