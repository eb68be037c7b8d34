// Every random choice is drawn from a stream named by the seed, the purpose and the tree index, so a tree
// depends on nothing but those: the same seed gives the same forest on any number of workers.
import seedrandom from 'seedrandom';

export type Random = () => number;

export function stream(seed: number, purpose: string, index = 0): Random {
  return seedrandom.alea(`copse:${seed}:${purpose}:${index}`);
}

/** Fisher–Yates shuffle in place. */
export function shuffle(a: Int32Array, random: Random): void {
  for (let i = a.length - 1; i > 0; i--) {
    const j = Math.floor(random() * (i + 1));
    const t = a[i];
    a[i] = a[j];
    a[j] = t;
  }
}
