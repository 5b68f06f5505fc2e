import type { Progress } from "../core/progress.js";

/**
 * Progress on stderr: one self-overwriting line on a terminal, or a line per stage and at most one
 * update every few seconds when stderr is a file or pipe (so CI logs stay short).
 */
export function progressDisplay(stream: NodeJS.WriteStream = process.stderr, quiet = false): { progress: Progress; done(): void } {
  if (quiet) return { progress: () => {}, done: () => {} };
  const tty = Boolean(stream.isTTY);
  let lastStage = "";
  let lastPrint = 0;
  let lineOpen = false;
  const started = performance.now();
  const progress: Progress = (e) => {
    const now = performance.now();
    const pct = e.total > 0 ? ` ${Math.min(100, Math.floor((100 * e.done) / e.total))
      .toString()
      .padStart(3)} %` : "";
    const counts = e.total > 0 ? ` (${e.done.toLocaleString("en")}/${e.total.toLocaleString("en")})` : "";
    const text = `${e.stage}${pct}${counts}${e.message ? ` ${e.message}` : ""}`;
    const elapsed = ((now - started) / 1000).toFixed(1).padStart(6);
    if (tty) {
      if (now - lastPrint < 80 && e.stage === lastStage && e.done < e.total) return;
      stream.write(`\r\x1b[2K[${elapsed} s] ${text}`);
      lineOpen = true;
      if (e.stage !== lastStage && lastStage !== "") {
        /* the overwritten line already shows the new stage */
      }
    } else {
      const stageChanged = e.stage !== lastStage;
      if (!stageChanged && now - lastPrint < 5000 && !(e.total > 0 && e.done >= e.total)) return;
      stream.write(`[${elapsed} s] ${text}\n`);
    }
    lastStage = e.stage;
    lastPrint = now;
  };
  return {
    progress,
    done: () => {
      if (tty && lineOpen) stream.write("\r\x1b[2K");
    },
  };
}
