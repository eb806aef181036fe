// Findings of each template family, each defined beside its family's own file.
import type { ContrastFinding } from './contrast.js';
import type { GrowthFinding } from './growth.js';
import type { KpiFinding } from './kpi.js';
import type { PerformanceFinding } from './performance.js';
import type { SegmentFinding } from './segments.js';
import type { TableFinding } from './table.js';

export type FamilyFinding = ContrastFinding | GrowthFinding | KpiFinding | PerformanceFinding | SegmentFinding | TableFinding;
