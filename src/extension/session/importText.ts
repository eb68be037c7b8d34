// What is said, wherever it applies, about what an imported forest cannot show: one wording for hover, panel and summary.

export { UNAVAILABLE_FOR_IMPORT } from '../engine';

/** Said wherever contributions are shown for a forest whose covers were counted from the CSV. */
export const COVERS_FROM_FILE = 'contributions weigh each split by this file\'s rows: the ONNX file carries no training covers';
