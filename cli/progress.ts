// A progress line on stderr (ions done, ions/s, time left), drawn only when stderr is a terminal.

export function progressBar(label: string): { update: (done: number, total: number) => void; end: () => void } {
  const tty = process.stderr.isTTY === true;
  const t0 = performance.now();
  let last = 0;
  return {
    update(done, total) {
      if (!tty) return;
      const now = performance.now();
      if (now - last < 200 && done < total) return;
      last = now;
      const s = (now - t0) / 1000;
      const rate = done / Math.max(s, 1e-6);
      const eta = rate > 0 ? (total - done) / rate : Infinity;
      const width = 28;
      const filled = Math.round((width * done) / Math.max(total, 1));
      const bar = '█'.repeat(filled) + '·'.repeat(width - filled);
      process.stderr.write(`\r${label} ${bar} ${done}/${total} ions  ${rate.toFixed(0)} ions/s  ${Number.isFinite(eta) ? `${eta.toFixed(0)} s left` : ''}   `);
    },
    end() {
      if (tty) process.stderr.write('\n');
    },
  };
}
