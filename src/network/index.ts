// The network stage: route patterns and distances along the path.
export * from './types.js';
export * from './geodesy.js';
export * from './alongShape.js';
export * from './shapeDistUnit.js';
export * from './simplifyPath.js';
export * from './scheduledTimes.js';
export * from './buildPatterns.js';
export * from './patternFigures.js';
