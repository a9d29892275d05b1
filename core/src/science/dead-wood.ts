// Standing dead wood: the biomass of a stem recorded `dead`, from the same allometry as a live stem of
// its size and wood density, reduced for what a standing dead tree has lost (leaves, fine branches and
// part of its crown, and wood density to decay). Rules and sources: docs/methods.md#standing-dead-wood.
// The upload records no decay class, so one share applies to every dead stem: a setting
// (STEMWISE_STANDING_DEAD_SHARE). Its default, 0.7, is stemwise's choice (common practice, no single
// source): a standing dead tree has lost its leaves and fine branches and, with time, much of its crown
// and some wood density to decay; national methods with decay classes should set their own.
// Kept apart from live biomass: a dead stem never enters the live columns.

/** Share of the live-tree allometric biomass a standing dead stem keeps (common practice; a setting). */
export const DEFAULT_STANDING_DEAD_SHARE = 0.7;

// B_dead = s · B_allometry(ρ, D, H), s = 0.7 by default — common practice (no single source), docs/methods.md#standing-dead-wood
export function standingDeadBiomass(allometricKg: number, share: number = DEFAULT_STANDING_DEAD_SHARE): number {
  if (!(allometricKg >= 0) || !Number.isFinite(allometricKg)) {
    throw new RangeError(`standingDeadBiomass: allometric biomass must be finite and >= 0 kg (got ${allometricKg})`);
  }
  if (!(share > 0 && share <= 1)) {
    throw new RangeError(`standingDeadBiomass: share must be in (0, 1] (got ${share})`);
  }
  return share * allometricKg;
}
