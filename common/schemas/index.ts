export * from './collection.ts';
export * from './subject.ts';
