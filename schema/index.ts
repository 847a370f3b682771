export * from './users';
