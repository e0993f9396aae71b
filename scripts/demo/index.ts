/** Demo scenario of Cartouche: invented museum, people, collections, and the drawn scans. */
export * from './scenario.ts';
export * from './scene.ts';
export { renderItemImage, renderScene, sceneSize, type RenderOptions, type RenderedImage } from './render.ts';
