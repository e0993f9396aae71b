/** The embedder part of what /api/health answers (server/src/services/health.ts builds it, the status line reads it). */

/** The API process's embedder: which runtime turns images into features (the night-shift worker reads the same settings). */
export interface EmbedderHealth {
  /** what the settings ask for: the built-in backbone on onnx or tfjs, or a model named by a configuration file */
  requested: 'onnx' | 'tfjs' | 'configured model';
  /** idle: not started yet (the API starts it at start-up, an app made in a test at first use); failed: it could not start */
  state: 'idle' | 'starting' | 'ready' | 'failed';
  id: string | null;
  runtime: 'onnx' | 'tfjs' | null;
  /** why the requested runtime is not the one in use */
  fallbackReason: string | null;
  /** ONNX against TF.js on the start-up probe image */
  agreement: { relativeL2: number; maxAbs: number; lowestCosine: number } | null;
  error?: string;
}
