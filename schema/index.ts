export * from './users';
export * from './templates';
export * from './sets';
export * from './classes';
