// A one-line progress bar on a terminal's stderr; silent when stderr is not a terminal.
export function progressBar(label: string): { update(done: number, total: number): void; end(): void } {
  const tty = process.stderr.isTTY === true;
  let shown = false;
  return {
    update(done, total) {
      if (!tty) return;
      const width = 30;
      const filled = Math.round((done / total) * width);
      process.stderr.write(`\r${label} [${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${done}/${total}`);
      shown = true;
    },
    end() {
      if (shown) process.stderr.write('\n');
    },
  };
}
