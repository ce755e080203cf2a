export * from './auth';
export * from './team';
export * from './errors';
