/** Stage templates: how a job of each installation type breaks down into stages. */
export type InstallationType = 'in_ground' | 'semi_recessed' | 'slab' | 'deck';
export type DependencyType = 'FS' | 'SS' | 'FF' | 'SF';
export type LagUnit = 'working_hours' | 'working_days' | 'elapsed_hours' | 'elapsed_days';

/** A stage's length: fixed, or worked out from the job's excavation volume (with a fallback). */
export type DurationRule = { kind: 'fixed'; minutes: number } | { kind: 'excavation'; fallbackMinutes: number };

export interface Requirement {
  kind: string;
  count: number;
}

/**
 * Notice a stage needs before it may be booked, in working days from now or from the order date:
 * the crane firm's (time for a site visit and a lift plan), the electrician's, the maker's lead
 * time. With `resourceKind` it is that party's notice and holds only its booking (the crane, not
 * the installer's own crew); without, the whole stage. The engine checks it on the job's stage.
 */
export interface StageNotice {
  workingDays: number;
  countedFrom: 'now' | 'order';
  resourceKind?: string | null;
  /** Whose notice it is, for messages ("the maker's lead time"). */
  reason?: string | null;
}

export interface StageTemplate {
  kind: string;
  name: string;
  duration: DurationRule;
  requirements: Requirement[];
  /** Successors wait until the base reaches this share of its 28-day strength. */
  cure?: { targetFraction: number } | null;
  /** Notice the stage needs, in working days, counted from now or from the order date (see StageNotice). */
  leadTime?: StageNotice | null;
  /** 'crane' stages are planned only when a crane is needed; 'no_crane' only when it is not. */
  when?: 'always' | 'crane' | 'no_crane';
  /**
   * A stage no longer than a working day is booked within one working day unless this is true
   * (work that can stop overnight and carry on). Longer stages run over days either way. Default false.
   */
  mayContinueNextDay?: boolean;
  /** Placed as late as the stages after it allow (see Stage.justInTime in the engine). Default false. */
  justInTime?: boolean;
}

export interface LinkTemplate {
  from: string;
  to: string;
  type: DependencyType;
  lagAmount: number;
  lagUnit: LagUnit;
  /**
   * The successor loads the base and waits for its cure as well as the lag (a lift onto a slab);
   * false or absent: the lag alone (block walls on a base that has set overnight).
   */
  waitsForCure?: boolean;
}

export interface InstallTemplate {
  installationType: InstallationType;
  name: string;
  stages: StageTemplate[];
  links: LinkTemplate[];
}
