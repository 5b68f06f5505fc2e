/** Progress of a long step. `total` may be 0 when unknown. */
export interface ProgressEvent {
  stage: string;
  done: number;
  total: number;
  message?: string;
}

export type Progress = (event: ProgressEvent) => void;

export const silentProgress: Progress = () => {};

/**
 * Wrap a progress callback so that it fires at most every `everyMs` milliseconds (plus the first and
 * last event), which keeps hot loops cheap.
 */
export function throttleProgress(progress: Progress, everyMs = 200): Progress {
  let last = -Infinity;
  return (e) => {
    const now = performance.now();
    if (e.done === 0 || e.done >= e.total || now - last >= everyMs) {
      last = now;
      progress(e);
    }
  };
}
