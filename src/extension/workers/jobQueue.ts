// The order explanation requests go to their single thread. A hover or a click must not wait behind the
// background work (the global view, intervals for every row): that work is cut into small requests queued
// at a lower urgency, so whatever the user is waiting for goes next. Pure, no threads.

/** 'now': someone is looking at the answer; 'soon': they likely will; 'idle': background filling. */
export type Urgency = 'now' | 'soon' | 'idle';

const RANK: Record<Urgency, number> = { now: 0, soon: 1, idle: 2 };

export class JobQueue<T> {
  private readonly lanes: T[][] = [[], [], []];

  get size(): number {
    return this.lanes[0].length + this.lanes[1].length + this.lanes[2].length;
  }

  push(item: T, urgency: Urgency): void {
    this.lanes[RANK[urgency]].push(item);
  }

  /** The most urgent item, first come first served within an urgency. */
  shift(): T | undefined {
    for (const lane of this.lanes) if (lane.length > 0) return lane.shift();
    return undefined;
  }

  /** Takes an item out before it runs; false when it is not queued (already running, or done). */
  remove(item: T): boolean {
    for (const lane of this.lanes) {
      const i = lane.indexOf(item);
      if (i >= 0) {
        lane.splice(i, 1);
        return true;
      }
    }
    return false;
  }

  find(match: (item: T) => boolean): T | undefined {
    for (const lane of this.lanes) {
      const found = lane.find(match);
      if (found !== undefined) return found;
    }
    return undefined;
  }

  /** Moves a queued item to a more urgent lane (never to a less urgent one). */
  raise(item: T, urgency: Urgency): void {
    const to = RANK[urgency];
    for (let r = to + 1; r < this.lanes.length; r++) {
      const i = this.lanes[r].indexOf(item);
      if (i >= 0) {
        this.lanes[r].splice(i, 1);
        this.lanes[to].push(item);
        return;
      }
    }
  }

  /** Empties the queue, returning what was in it. */
  drain(): T[] {
    return this.lanes.flatMap((lane) => lane.splice(0));
  }
}
