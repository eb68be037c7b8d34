import { openModelFile } from '../../core/open/open';
import { saveOnnxFile } from '../../core/onnx/save';
import { INPUT_NAME } from '../../core/onnx/metadata';
import { flag, parse, UsageError, type Options } from '../args';
import { say, sayError } from '../terminal';
import { DEBUG_ENTRY, optionList } from '../help';
import { checkOutput, oneStdout, toStdout, writeFailure } from '../output';

export const EXPORT_HELP = `Usage: copse export MODEL.json OUT.onnx [--json]

Writes a saved forest as an ONNX model (ai.onnx.ml TreeEnsembleClassifier or TreeEnsembleRegressor), for
scoring with any ONNX runtime. MODEL.json may also be an XGBoost JSON model: the boosted ensemble is written
with its raw scores summed (base_values, post_transform LOGISTIC or SOFTMAX for classes).

The graph reads one float tensor "${INPUT_NAME}" [rows, features], one column per feature in the model's order:
numeric values as they are; categorical and boolean features as the position of the level in the model's level
list (0 for the first); NaN for a missing cell or an unknown level. Classification gives "label" (the class
name) and "probabilities" [rows, classes]; regression gives "value" [rows, 1]. The file's metadata
(copse.schema) lists the features, their levels and the classes.

Options:
${optionList([['--json', 'print one JSON object: output path, operator, trees, nodes, bytes'], DEBUG_ENTRY])}

OUT.onnx may be - for standard output; the summary then goes to standard error.
`;

const OPTIONS: Options = { json: { type: 'boolean' } };

export async function runExport(argv: string[]): Promise<void> {
  const args = parse('export', argv, OPTIONS, 2);
  if (flag(args, 'help')) return void process.stdout.write(EXPORT_HELP);
  const [modelPath, outPath] = args.positionals;
  if (/\.onnx$/i.test(modelPath)) throw new UsageError(`${modelPath} looks like an ONNX file already; copse export reads a Copse model (MODEL.json) and writes ONNX.`, 'export');
  oneStdout(outPath, flag(args, 'json'), 'the output -');
  await checkOutput(outPath, 'output', [
    { file: modelPath, what: 'the model', refusal: `Refusing to write the ONNX file over the model ${modelPath}; choose another output file.` },
  ]);
  // A Copse model file or an XGBoost JSON model (a boosted ensemble, written with its link and base scores).
  const { forest } = await openModelFile(modelPath);
  const size = await saveOnnxFile(outPath, forest).catch((e) => {
    throw writeFailure(e, outPath);
  });
  const classification = forest.schema.target.task === 'classification';
  const summary = {
    output: outPath,
    operator: classification ? 'TreeEnsembleClassifier' : 'TreeEnsembleRegressor',
    trees: forest.trees.length,
    nodes: forest.trees.reduce((s, t) => s + t.nodeCount, 0),
    bytes: size,
    input: { name: INPUT_NAME, features: forest.schema.features.map((f) => f.name) },
    outputs: classification ? ['label', 'probabilities'] : ['value'],
  };
  if (flag(args, 'json')) {
    process.stdout.write(JSON.stringify(summary, null, 2) + '\n');
    return;
  }
  const levelled = forest.schema.features.filter((f) => f.kind !== 'numeric').map((f) => `"${f.name}"`);
  let out = `Wrote ${summary.trees} trees (${summary.nodes} nodes) to ${toStdout(outPath) ? 'standard output' : outPath} as an ONNX ${summary.operator}, ${(size / 1024).toFixed(0)} KiB.\n`;
  out += `Input "${INPUT_NAME}": float [rows, ${forest.schema.features.length}], columns ${summary.input.features.map((f) => `"${f}"`).join(', ')}.\n`;
  if (levelled.length) out += `Give ${levelled.join(', ')} as level codes: the level's position in the model's list (see the file's copse.schema metadata).\n`;
  out += `Outputs: ${summary.outputs.map((o) => `"${o}"`).join(', ')}.\n`;
  (toStdout(outPath) ? sayError : say)(out);
}
