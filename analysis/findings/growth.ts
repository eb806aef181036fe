// Placeholder until this family's templates land.
export type GrowthFinding = never;
