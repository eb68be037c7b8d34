// Synthetic benchmark data: 20 numeric features and a three-class label, written as CSV.
// Only x1..x8 carry signal (through products, a sine and an absolute value, so axis-aligned trees
// have work to do); x9..x20 are noise. Gumbel noise on the class scores makes the best possible
// accuracy well below 1, so holdout accuracy is a real comparison and not a tie at 100%.
import { once } from 'node:events';
import { createWriteStream } from 'node:fs';
import seedrandom from 'seedrandom';

export const FEATURES = 20;
export const TARGET = 'label';
export const CLASSES = ['amber', 'brine', 'cobalt'] as const;

export interface Generator {
  /** Writes `rows` rows (header first) to `file`; returns the class counts written. */
  write(file: string, rows: number): Promise<Record<string, number>>;
}

/** One seeded stream: files written one after another from it never share rows. */
export function threeClassGenerator(seed: string, noise = 0.3): Generator {
  const rng = seedrandom(seed);
  let spare: number | null = null;
  const normal = (): number => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = rng();
    const r = Math.sqrt(-2 * Math.log(u));
    const t = 2 * Math.PI * rng();
    spare = r * Math.sin(t);
    return r * Math.cos(t);
  };
  const gumbel = (): number => {
    let u = 0;
    while (u === 0) u = rng();
    return -Math.log(-Math.log(u));
  };

  const header = [...Array.from({ length: FEATURES }, (_, j) => `x${j + 1}`), TARGET].join(',') + '\n';
  const x = new Float64Array(FEATURES);

  return {
    async write(file: string, rows: number): Promise<Record<string, number>> {
      const out = createWriteStream(file);
      const counts: Record<string, number> = Object.fromEntries(CLASSES.map((c) => [c, 0]));
      out.write(header);
      const chunk: string[] = [];
      for (let i = 0; i < rows; i++) {
        for (let j = 0; j < FEATURES; j++) x[j] = Math.round(normal() * 1e4) / 1e4;
        const s0 = 1.5 * x[0] + Math.sin(2 * x[1]) - 0.7 * x[2] * x[3] + noise * gumbel();
        const s1 = x[1] * x[1] - 1 + 0.8 * x[4] + 0.6 * Math.abs(x[5]) + noise * gumbel();
        const s2 = 0.5 * x[6] - 0.5 * x[7] + noise * gumbel();
        const k = s0 >= s1 && s0 >= s2 ? 0 : s1 >= s2 ? 1 : 2;
        counts[CLASSES[k]]++;
        chunk.push(Array.prototype.join.call(x, ',') + ',' + CLASSES[k]);
        if (chunk.length === 5000) {
          if (!out.write(chunk.join('\n') + '\n')) await once(out, 'drain');
          chunk.length = 0;
        }
      }
      if (chunk.length > 0) out.write(chunk.join('\n') + '\n');
      out.end();
      await once(out, 'finish');
      return counts;
    },
  };
}
