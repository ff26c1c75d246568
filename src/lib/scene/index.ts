// The scene document: schema and parsing, shapes, prop keyframes and poses, liquid presets, frame/time and the scene hash.
export * from './schema';
export * from './shapes';
export * from './keys';
export * from './pose';
export * from './liquids';
export * from './time';
export * from './hash';
