// Progress reporting for long CLI runs: a bar redrawn in place on a terminal, plain lines (every
// 10%) when stderr is not a TTY, so logs stay readable. CLI layer.
export interface ProgressReporter {
  update(fraction: number, stage: string): void;
  done(): void;
}

export function progressReporter(label: string, stream: NodeJS.WriteStream = process.stderr): ProgressReporter {
  const tty = stream.isTTY === true;
  let lastDecile = -1;
  let drawn = false;
  return {
    update(fraction, stage) {
      const f = Math.max(0, Math.min(1, fraction));
      if (tty) {
        const width = 30;
        const full = Math.round(f * width);
        stream.write(`\r${label} [${"#".repeat(full)}${" ".repeat(width - full)}] ${(100 * f).toFixed(0).padStart(3)}% ${stage.slice(0, 40).padEnd(40)}`);
        drawn = true;
      } else {
        const decile = Math.floor(f * 10);
        if (decile > lastDecile) {
          lastDecile = decile;
          stream.write(`${label}: ${(100 * f).toFixed(0)}% ${stage}\n`);
        }
      }
    },
    done() {
      if (tty && drawn) stream.write("\r" + " ".repeat(90) + "\r");
    },
  };
}
