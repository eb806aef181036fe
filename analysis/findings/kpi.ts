// Placeholder until this family's templates land.
export type KpiFinding = never;
