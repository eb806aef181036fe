// Presenters by template name.
import type { Presenter } from './presenter.js';
import { presentSeries } from './series.js';

export type { PresentContext, Presented, Presenter, Takeaway } from './presenter.js';

export const PRESENTERS: Record<string, Presenter> = {
  series: presentSeries,
};

export function presenterFor(template: string): Presenter {
  const p = PRESENTERS[template];
  if (!p) throw new Error(`no presenter for template ${template}`);
  return p;
}
