// The scene document: schema and parsing, shapes, prop keyframes, frame/time and the scene hash.
export * from './schema';
export * from './shapes';
export * from './keys';
export * from './time';
export * from './hash';
