/** Public API of the renderers: colour charts and synthetic photos (re-exports only). */
export * from './chartTable.js';
export * from './orderBoundaries.js';
export * from './thicknessColourLut.js';
export * from './renderPhoto.js';
export * from './chartSvg.js';
