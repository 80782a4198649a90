/**
 * A benchmark case. `run` is timed (median of `repeats` runs after `warmup` runs). When `reference`
 * is given and its interpreter is installed, the same work runs there in the same session and the
 * runner prints our median divided by the reference median (below 1 means faster than the reference).
 */
export interface BenchCase {
  name: string;
  /** The target stated by the issue, printed beside the figure, e.g. "≤ 1 s". */
  target?: string;
  /** Target as seconds, when the target is an absolute time; the runner marks pass / miss. */
  targetSeconds?: number;
  /** Optional preparation, not timed; its result is passed to `run`. */
  setup?: () => unknown | Promise<unknown>;
  run: (prepared: unknown) => unknown | Promise<unknown>;
  warmup?: number;
  repeats?: number;
  /**
   * Reference run: a script under bench/reference/ executed with the system python3. It prints one
   * JSON line `{"seconds": <median seconds>, ...extra}`; extra keys are printed alongside.
   */
  reference?: {
    script: string;
    args?: string[];
    label: string;
    maxRatio?: number;
    /**
     * Further timings the script prints beside `seconds` (e.g. `{"lstsq_seconds": …}`), each shown
     * as its own ratio ours / that timing. A script with the same arguments runs once per `npm run
     * bench`, so cases that share it are compared with the same reference figures.
     */
    compare?: { key: string; label: string; maxRatio?: number }[];
  };
  /** Extra figures for the report (e.g. objective values), computed once after timing. */
  report?: (prepared: unknown, lastResult: unknown) => Record<string, number | string>;
}
