export * from './types';
export * from './coding';
export * from './validate';
export * from './model-terms';
