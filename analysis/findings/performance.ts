// Placeholder until this family's templates land.
export type PerformanceFinding = never;
