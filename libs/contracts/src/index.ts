export * from './error.schema';
export * from './auth.schema';
export * from './farm.schema';
export * from './house.schema';
export * from './user.schema';
export * from './health.schema';
export * from './ingest.schema';
export * from './simulator.schema';
