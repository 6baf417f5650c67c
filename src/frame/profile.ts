import type { Profile, Trace } from "../types.js";

/** Options of `fitProfile`; lengths in metres. */
export interface ProfileOptions {
  /** Force a closed (periodic) or open fit; undefined: use trace.closed, else detect from the ends. */
  readonly closed?: boolean;
  /** Bootstrap replicates for the 95% bands (default 200; 0 disables the bands). */
  readonly bootstrap?: number;
  /** Seed of the bootstrap random stream (default 1). */
  readonly seed?: number;
  /** Resample at this arc-length step (m) instead of one sample per input point. */
  readonly step?: number;
  /** Keep the bootstrap replicates of kappa and tau in the profile (for the physics stage). */
  readonly keepSamples?: boolean;
}

/** Placeholder until the geometry core lands (being written now). */
export function fitProfile(_trace: Trace, _options: ProfileOptions = {}): Profile {
  throw new Error("fitProfile: not implemented yet");
}
