// A seeded fuzz test over the three readers of untrusted files: the CSV loader, the model reader and the ONNX
// reader. Each file of the committed corpus (test/fuzz/corpus, invented data and forests fitted on it) is
// mutated a fixed number of times, byte-wise and token-wise, and every result must be read or refused with a
// classified error (DataError for a table, ModelError for a model) whose message is one line. Deterministic:
// the same seed gives the same cases, so a failure names a case that can be run again. Bounded by count, not by
// the clock: a fixed number of cases, inputs capped in size, and a case that has not settled after a budget of
// event-loop turns counts as a hang.
import * as assert from 'node:assert/strict';
import { readdirSync, readFileSync } from 'node:fs';
import * as path from 'node:path';
import { Readable } from 'node:stream';
import { loadFromSource } from '../../src/core/csv/loader';
import type { ByteSource } from '../../src/core/csv/sources';
import { DataError } from '../../src/core/csv/types';
import { ModelError, parseModel } from '../../src/core/model/file';
import { boundedLines } from '../../src/core/model/lines';
import { readOnnx } from '../../src/core/onnx/import';

const corpus = path.join(__dirname, '..', '..', '..', 'test', 'fuzz', 'corpus');
const SEED = 0x12c0;
/** Cases per corpus file. */
const CASES = { csv: 150, model: 150, onnx: 150 };
/** Mutated inputs never grow past this, so no case can take long however it is read. */
const MAX_BYTES = 64 * 1024;
/** Event-loop turns a case may take before it counts as a hang (the loader needs a few per 64 KiB). */
const TURN_BUDGET = 20_000;

/** mulberry32: a small seeded generator, enough to pick mutations reproducibly. */
function generator(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Byte strings that tend to break readers: delimiters, quotes, line ends, odd numbers, broken UTF-8. */
const TOKENS = [
  '"', '""', ',', ';', '\t', '|', '\n', '\r\n', '\r', '\0', '\xff', '\xc3', '\u00e9', '\ufeff', ' ', '1e39', '-1e309', 'NaN', '9007199254740993',
  '0x10', '-0', '1,5', '"1,234"', '[]', '{}', 'null', '[', ']', '{', '}', ':', '-1', '65536', '1e400', 'true', '\x1b[31m',
].map((t) => Buffer.from(t, 'latin1'));

function mutate(input: Buffer, rnd: () => number): Buffer {
  let b = Buffer.from(input);
  const steps = 1 + Math.floor(rnd() * 4);
  for (let s = 0; s < steps; s++) {
    const at = Math.floor(rnd() * (b.length + 1));
    switch (Math.floor(rnd() * 8)) {
      case 0: // flip a bit
        if (b.length) b[Math.min(at, b.length - 1)] ^= 1 << Math.floor(rnd() * 8);
        break;
      case 1: // set a random byte
        if (b.length) b[Math.min(at, b.length - 1)] = Math.floor(rnd() * 256);
        break;
      case 2: // delete a run
        b = Buffer.concat([b.subarray(0, at), b.subarray(Math.min(b.length, at + 1 + Math.floor(rnd() * 64)))]);
        break;
      case 3: // insert a token
        b = Buffer.concat([b.subarray(0, at), TOKENS[Math.floor(rnd() * TOKENS.length)], b.subarray(at)]);
        break;
      case 4: // truncate
        b = b.subarray(0, at);
        break;
      case 5: {
        // duplicate a run somewhere else
        const from = Math.floor(rnd() * (b.length + 1));
        const run = b.subarray(from, from + 1 + Math.floor(rnd() * 512));
        b = Buffer.concat([b.subarray(0, at), run, b.subarray(at)]);
        break;
      }
      case 6: {
        // replace a number with an odd one (reaches the value checks, not only the JSON parser)
        const text = b.toString('latin1');
        const numbers = [...text.matchAll(/-?\d+(\.\d+)?(e[-+]?\d+)?/g)];
        if (numbers.length) {
          const m = numbers[Math.floor(rnd() * numbers.length)];
          const odd = ['1e39', '-1', '0', '1e308', '9007199254740993', '0.5', '100001', '4294967296', '-0'][Math.floor(rnd() * 9)];
          b = Buffer.from(text.slice(0, m.index) + odd + text.slice((m.index ?? 0) + m[0].length), 'latin1');
        }
        break;
      }
      default: {
        // repeat a line many times
        const text = b.toString('latin1');
        const lines = text.split('\n');
        const k = Math.floor(rnd() * lines.length);
        lines.splice(k, 0, ...Array.from({ length: 1 + Math.floor(rnd() * 20) }, () => lines[k]));
        b = Buffer.from(lines.join('\n'), 'latin1');
      }
    }
  }
  return b.length > MAX_BYTES ? b.subarray(0, MAX_BYTES) : b;
}

function bytesSource(bytes: Buffer, label: string): ByteSource {
  return {
    label,
    // eslint-disable-next-line @typescript-eslint/require-await -- the bytes are here; async for the AsyncIterable the loader takes.
    read: async function* (start) {
      for (let at = start; at < bytes.length; at += 4096) yield bytes.subarray(at, Math.min(bytes.length, at + 4096));
    },
  };
}

/** The first lines of an unexpected error's stack, for the failure message. */
function firstLines(e: unknown): string {
  const text = e instanceof Error ? (e.stack ?? e.message) : JSON.stringify(e);
  return (text ?? 'undefined').split('\n').slice(0, 3).join(' | ');
}

interface Tally {
  cases: number;
  read: number;
  refused: number;
  crashes: string[];
  hangs: string[];
  multiLine: string[];
}

/** Settles `work` or reports a hang after the turn budget; never looks at the clock. */
async function withinBudget(work: Promise<unknown>): Promise<{ done: true; error?: unknown } | { done: false }> {
  let settled: { done: true; error?: unknown } | undefined;
  work.then(
    () => (settled = { done: true }),
    (error: unknown) => (settled = { done: true, error }),
  );
  for (let turn = 0; turn < TURN_BUDGET && settled === undefined; turn++) await new Promise((r) => setImmediate(r));
  return settled ?? { done: false };
}

async function run(kind: keyof typeof CASES, read: (bytes: Buffer, label: string) => Promise<unknown>, expected: (e: unknown) => boolean): Promise<Tally> {
  const tally: Tally = { cases: 0, read: 0, refused: 0, crashes: [], hangs: [], multiLine: [] };
  const dir = path.join(corpus, kind);
  for (const [f, file] of readdirSync(dir).sort().entries()) {
    const original = readFileSync(path.join(dir, file));
    const rnd = generator(SEED + 7919 * f + kind.length);
    for (let i = 0; i < CASES[kind]; i++) {
      const input = mutate(original, rnd);
      const name = `${kind}/${file} case ${i}`;
      tally.cases++;
      const outcome = await withinBudget(read(input, name));
      if (!outcome.done) tally.hangs.push(name);
      else if (outcome.error === undefined) tally.read++;
      else if (!expected(outcome.error)) tally.crashes.push(`${name}: ${firstLines(outcome.error)}`);
      else {
        tally.refused++;
        const message = (outcome.error as Error).message;
        if (message.includes('\n') || message.includes('\r')) tally.multiLine.push(`${name}: ${JSON.stringify(message)}`);
      }
    }
  }
  return tally;
}

function check(kind: string, t: Tally): void {
  // The counts go to the test's output, for the report.
  process.stdout.write(`      ${kind}: ${t.cases} cases, ${t.read} read, ${t.refused} refused, ${t.crashes.length} crashes, ${t.hangs.length} hangs, ${t.multiLine.length} multi-line errors\n`);
  assert.deepEqual(t.crashes, [], 'unclassified errors');
  assert.deepEqual(t.hangs, [], 'cases past the turn budget');
  assert.deepEqual(t.multiLine, [], 'messages of more than one line');
  assert.equal(t.read + t.refused, t.cases);
}

describe('fuzzing the readers of untrusted files (seeded, counted)', function () {
  this.timeout(120000);

  it('the mutator is deterministic and changes its input', () => {
    const input = Buffer.from('a,b\n1,2\n');
    const one = mutate(input, generator(5));
    assert.ok(one.equals(mutate(input, generator(5))));
    const changed = Array.from({ length: 20 }, (_, i) => mutate(input, generator(i))).filter((b) => !b.equals(input)).length;
    assert.ok(changed >= 15, `only ${changed} of 20 mutations changed the input`);
  });

  it('the CSV loader reads or refuses every mutated table with a one-line DataError', async () => {
    const t = await run(
      'csv',
      (bytes, label) => loadFromSource(bytesSource(bytes, label), { target: bytes.toString('latin1').split(/[,;\t|\r\n]/)[0].replace(/^\ufeff|"/g, '') || undefined }),
      (e) => e instanceof DataError,
    );
    check('CSV', t);
    // The corpus and mutations reach both outcomes, so neither check above is empty.
    assert.ok(t.read > 0 && t.refused > 0);
  });

  it('the model reader reads or refuses every mutated model with a one-line ModelError', async () => {
    const t = await run(
      'model',
      async (bytes, label) => {
        // Through the bounded line reader, as a file is read, then the parser.
        const lines: string[] = [];
        for await (const line of boundedLines(Readable.from([bytes]), label, { maxLineBytes: 32 * 1024, maxBlankBytes: 1024, maxFileBytes: MAX_BYTES })) lines.push(line);
        return parseModel(lines.join('\n'), label);
      },
      (e) => e instanceof ModelError,
    );
    check('model', t);
    assert.ok(t.read > 0 && t.refused > 0);
  });

  it('the ONNX reader reads or refuses every mutated file with a one-line ModelError', async () => {
    // eslint-disable-next-line @typescript-eslint/require-await -- readOnnx is synchronous; async so a throw becomes a rejection.
    const t = await run('onnx', async (bytes, label) => readOnnx(new Uint8Array(bytes), label), (e) => e instanceof ModelError);
    check('ONNX', t);
    assert.ok(t.read > 0 && t.refused > 0);
  });
});
