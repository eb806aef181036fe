// The template contract; each template is registered with its sub-question in
// analysis/sub-questions/registry.ts.
export type { ReadContext, Reading, Template } from './template.js';
