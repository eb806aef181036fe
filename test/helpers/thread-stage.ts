// A stored thread state, checked to be in the stage a test expects and typed as that stage.
import { expect } from 'vitest';
import type { Stage, StateAt, ThreadState } from '../../bot/thread-state.js';

export function inStage<S extends Stage>(state: ThreadState | undefined, stage: S): StateAt<S> {
  expect(state?.stage).toBe(stage);
  return state as StateAt<S>;
}
