/** A progress bar on stderr: redrawn in place on a terminal, a line per quarter otherwise. */
export interface ProgressBar {
  update(fraction: number): void;
  finish(completed?: boolean): void;
}

const WIDTH = 30;

export function createProgressBar(label: string): ProgressBar {
  const stream = process.stderr;
  const interactive = stream.isTTY === true;
  let lastShown = -1;
  return {
    update(fraction: number): void {
      const clamped = Math.min(1, Math.max(0, fraction));
      if (interactive) {
        const percent = Math.floor(clamped * 100);
        if (percent === lastShown) return;
        lastShown = percent;
        const filled = Math.round(clamped * WIDTH);
        stream.write(`\r${label} [${'#'.repeat(filled)}${'-'.repeat(WIDTH - filled)}] ${percent}%`);
        return;
      }
      const quarter = Math.floor(clamped * 4);
      if (quarter > lastShown && quarter < 4) {
        lastShown = quarter;
        stream.write(`${label}: ${quarter * 25}%\n`);
      }
    },
    /** End the bar; `completed` work shows 100 % (a run that succeeded never ends at 75 %). */
    finish(completed = false): void {
      if (completed) {
        if (interactive) this.update(1);
        else stream.write(`${label}: 100%\n`);
      }
      if (interactive && lastShown >= 0) stream.write('\n');
    },
  };
}
