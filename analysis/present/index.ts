// The presenter contract; each presenter is registered with its sub-question in
// analysis/sub-questions/registry.ts.
export type { PresentContext, Presented, Presenter, Takeaway } from './presenter.js';
