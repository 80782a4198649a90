/**
 * Shapes of a scheduling request and its answer. Times cross the boundary as ISO 8601 strings;
 * inside the solver they are epoch milliseconds.
 */

/** A factor level as the design gives it. */
export type LevelValue = string | number | boolean;

export interface ScheduleRun {
  id: string;
  /** Natural factor values of the run, by factor name. */
  values: Record<string, LevelValue>;
  /** Minutes the trial occupies the rig; falls back to the request's `defaultDurationMinutes`. */
  durationMinutes?: number;
  /** Runs sharing a whole plot stay together, in the given order, on one rig. */
  wholePlot?: string | number;
  /** Block label from the design; with `blockDays` it pins the run to a calendar day. */
  block?: string | number;
}

export interface TimeInterval {
  start: string;
  end: string;
}

export interface ScheduleRig {
  name: string;
  /** Working intervals (ISO 8601 instants), e.g. from `workingAvailability`. */
  available: TimeInterval[];
}

/** A person who runs trials on one rig during their hours. */
export interface ScheduleOperator {
  name: string;
  /** The rig this operator staffs. */
  rig: string;
  available: TimeInterval[];
}

export interface UpkeepRule {
  /** Upkeep (battery swap, inspection) is due after this many trials since the last one. */
  everyTrials?: number;
  /** ... or after this many minutes of trial time since the last one. */
  everyMinutes?: number;
  /** Minutes one upkeep takes. */
  minutes: number;
  /** Minimum rest between the end of one trial and the start of the next on the same rig. */
  cooldownMinutes?: number;
}

export interface ScheduleRequest {
  runs: ScheduleRun[];
  rigs: ScheduleRig[];
  /** Minutes a change of level costs, per hard-to-change factor (e.g. `{ surface: 40, gain: 0 }`). */
  changeoverMinutes?: Record<string, number>;
  upkeep?: UpkeepRule;
  /**
   * Optional staffing: a rig named by at least one operator runs only while one of them is on duty
   * (its hours intersected with the union of their hours); a rig no operator names keeps its hours.
   */
  operators?: ScheduleOperator[];
  /** Used when a run has no `durationMinutes`. */
  defaultDurationMinutes?: number;
  /** IANA zone that calendar days (blocks, day sheets) are read in; UTC when absent. */
  timeZone?: string;
  /** Block label → calendar day (yyyy-MM-dd in `timeZone`) on which that block's runs must happen. */
  blockDays?: Record<string, string>;
  /**
   * `sequential`: place whole plots in design order, each on the rig where it finishes first.
   * `grouped` (default): order whole plots to save changeovers, then finishing time.
   */
  strategy?: 'sequential' | 'grouped';
  /** Accepted for symmetry with the other endpoints; the solver is deterministic and draws no random numbers. */
  seed?: number;
}

export interface Assignment {
  runId: string;
  rig: string;
  start: string;
  end: string;
  /** With operators: the first listed operator of the rig on duty for the whole trial. */
  operator?: string;
}

/** Non-trial rig time the grid shows: a changeover or an upkeep, just before a trial. */
export interface RigActivity {
  rig: string;
  kind: 'changeover' | 'upkeep';
  start: string;
  end: string;
  /** The trial it prepares. */
  beforeRunId: string;
  /** For a changeover: the factors whose level changes, with from/to levels. */
  changes?: { factor: string; from: LevelValue; to: LevelValue }[];
}

export interface Unscheduled {
  runId: string;
  reason: string;
}

export interface Infeasibility {
  /** Which constraint fails: not enough rig time overall, or a piece of work longer than any interval. */
  constraint: 'rig_hours' | 'interval_length' | 'block_day' | 'fragmentation';
  message: string;
  requiredMinutes?: number;
  availableMinutes?: number;
  shortByMinutes?: number;
}

export interface ScheduleResult {
  assignments: Assignment[];
  activities: RigActivity[];
  /** Number of level changes of hard-to-change factors with a positive changeover time. */
  changeovers: number;
  changeoverMinutesTotal: number;
  /** From the earliest available instant over all rigs to the end of the last trial. */
  makespanMinutes: number;
  lowerBound: { changeovers: number; makespanMinutes: number };
  gap: { changeovers: number; makespanMinutes: number };
  unscheduled: Unscheduled[];
  infeasibility?: Infeasibility[];
  /** Notes a person should read (e.g. why a whole plot was refused). */
  notes: string[];
}
