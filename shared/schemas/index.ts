export * from './auth';
export * from './team';
export * from './errors';
export * from './cues';
export * from './board';
export * from './sync';
export * from './values';
