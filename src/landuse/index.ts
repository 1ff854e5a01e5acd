// The land-use input: where people live and work (readLandUse), polygons spread over their area
// (polygonPieces), and a grid for finding points near a place (pointGrid).
export * from './readLandUse.js';
export * from './polygonPieces.js';
export * from './pointGrid.js';
export * from './readLandUseAside.js';
