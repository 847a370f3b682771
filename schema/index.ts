export * from './users';
export * from './templates';
