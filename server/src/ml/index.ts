/**
 * Cartouche's machine-learning library: the embedder (feature backbone, on onnxruntime-node or TF.js), centring, the synthesis methods
 * of subject models, calibration, ranking, quality records and metrics. Free of HTTP and of the database:
 * pure functions and classes over Float32Array features; the API and the night-shift worker store what
 * they return.
 */
export * from './backbone/embedder.ts';
export { WorkerEmbedder, startWorkerEmbedders } from './backbone/worker-embedder.ts';
export { defaultModelCacheDir, embedderSelectionFromEnv, parseEmbedderConfig, selectedEmbedderConfig, type EmbedderSelection } from './backbone/selection.ts';
export { checkAgainstTfjs } from './backbone/builtin.ts';
export { OnnxEmbedder, type OnnxEmbedderOptions } from './onnx/onnx-embedder.ts';
export { convertGraphToOnnx, ConversionError, CONVERTER_VERSION, ONNX_OPSET, type ConvertOptions, type ConvertedModel } from './onnx/tfjs-to-onnx.ts';
export { ensureBackboneOnnx, backboneCacheKey, type BackboneOnnx } from './onnx/backbone-model.ts';
export { loadOnnxRuntime, DISABLE_SWITCH as DISABLE_ONNXRUNTIME_SWITCH, type OnnxRuntime } from './onnx/runtime.ts';
export { agreement, probeImage, AGREEMENT_TOLERANCE, type Agreement } from './onnx/agreement.ts';
export { decodeWeights, float16ToNumber, type WeightSpec, type DecodedTensor } from './onnx/weights.ts';
export { ensureBackend, wasmBinaryFolder, type BackendName } from './backbone/tfjs-runtime.ts';
export { readModelArtifacts, fileModelHandler, makeSpatialDimsDynamic } from './backbone/model-files.ts';
export { toSquareRgb, PREPROCESSING_VERSION, type RgbImage, type PreprocessOptions } from './backbone/preprocess.ts';
export * from './features.ts';
export * from './centring.ts';
export * from './model.ts';
export * from './calibration.ts';
export * from './ranking.ts';
export * from './quality.ts';
export * from './metrics.ts';
export { seededRng, shuffled, sample, type Rng } from './random.ts';
export { principalDirections, projectOnto } from './linalg.ts';
export * from './synthesis/prototype.ts';
export * from './synthesis/regressor.ts';
export * from './synthesis/photo-augmented.ts';
export * from './synthesis/logistic.ts';
export * from './synthesis/trained.ts';
export * from './synthesis/refined.ts';
export * from './synthesis/carried.ts';
export * from './synthesis/transductive.ts';
export * from './synthesize.ts';
