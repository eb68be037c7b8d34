// Opening a forest from either file Copse reads: its own model file, or an ONNX tree ensemble from elsewhere.
// Callers (CLI, editor) get one forest type back, plus where it came from, so what an import cannot know
// (the training sample, feature names) is reported instead of guessed. This is the one module that reaches
// both model/ and onnx/; onnx/ builds on model/'s checks, so the choice between them cannot live in model/.
import { promises as fs } from 'node:fs';
import type { Forest } from '../forest/forest';
import { columnsInOrder, loadOnnxFile, nameFeatures } from '../onnx/load';
import type { OnnxImport } from '../onnx/import';
import { loadModel } from '../model/file';
import { ModelError } from '../model/validate';
import { loadXgboostFile, isXgboostFile } from '../xgboost/load';
import type { XgboostImport } from '../xgboost/read';

export type ModelOrigin =
  | { readonly kind: 'copse' }
  | {
      readonly kind: 'onnx';
      /** Feature names came from Copse metadata in the file, or are positions (f0, f1, ...). */
      readonly names: OnnxImport['names'];
      readonly operator: OnnxImport['operator'];
      readonly producer: string;
      readonly notes: readonly string[];
    }
  | {
      readonly kind: 'xgboost';
      /** Feature names came from the file, or are positions (f0, f1, ...). */
      readonly names: 'file' | 'positions';
      readonly objective: string;
      /** The XGBoost version that wrote the file. */
      readonly version: string;
      readonly notes: readonly string[];
    };

export interface OpenedModel {
  readonly forest: Forest;
  readonly origin: ModelOrigin;
}

/** An ONNX file by its name, or by its first byte: a model file is JSON ("{"), an ONNX model starts with field 1's tag. */
export async function isOnnxFile(path: string): Promise<boolean> {
  if (/\.onnx$/i.test(path)) return true;
  if (/\.json$/i.test(path)) return false;
  let handle: fs.FileHandle | undefined;
  try {
    handle = await fs.open(path, 'r');
    const { buffer, bytesRead } = await handle.read(Buffer.alloc(1), 0, 1, 0);
    return bytesRead === 1 && buffer[0] === 0x08;
  } catch {
    return false; // loadModel reports the unreadable file
  } finally {
    await handle?.close();
  }
}

export async function openModelFile(path: string): Promise<OpenedModel> {
  if (!(await isOnnxFile(path))) {
    // Both are JSON: an XGBoost model is told from a Copse one by its content, whatever the file is called.
    if (await isXgboostFile(path)) {
      const x: XgboostImport = await loadXgboostFile(path);
      return { forest: x.forest, origin: { kind: 'xgboost', names: x.names, objective: x.objective, version: x.version, notes: x.notes } };
    }
    return { forest: await loadModel(path), origin: { kind: 'copse' } };
  }
  const imported = await loadOnnxFile(path);
  return {
    forest: imported.forest,
    origin: { kind: 'onnx', names: imported.names, operator: imported.operator, producer: imported.producer, notes: imported.notes },
  };
}

/** Whether the model's features are positions (f0, f1, ...) that a CSV's columns must name. */
export function namedByPosition(origin: ModelOrigin): boolean {
  return origin.kind !== 'copse' && origin.names === 'positions';
}

/** Whether the forest knows its training sample: an imported forest does not (its row count is 0). */
export function knowsTraining(forest: Forest): boolean {
  return forest.training.rows > 0;
}

/**
 * The forest with its features named by a CSV header's columns in order, leaving out the given columns (by
 * default the forest's target, if the header has it). For a model whose file carries no names; refuses unless exactly as many columns remain.
 */
export function nameByPosition(forest: Forest, header: readonly string[], leaveOut: readonly string[] = targetColumn(forest, header)): Forest {
  return nameFeatures(forest, columnsInOrder(header, forest.schema.features.length, leaveOut));
}

/** The columns nameByPosition leaves out unless told otherwise: the one named like the forest's target, if any. */
export function targetColumn(forest: Forest, header: readonly string[]): string[] {
  const target = forest.schema.target.name;
  return header.includes(target) ? [target] : [];
}

export { ModelError };
