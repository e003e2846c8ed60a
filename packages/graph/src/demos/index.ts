import type { Diagram } from '../document-types.ts';
import { heatingCascade } from './heating-cascade.ts';
import { positioningAxis } from './positioning-axis.ts';
import { supplyLoop } from './supply-loop.ts';
import { sampledAxis } from './sampled-axis.ts';

/**
 * Demo diagrams of our own. The TS modules are the source; the committed `<id>.loop.json`
 * files (what users open) are written from them by packages/graph/scripts/write-generated.ts
 * and a test checks that they match byte for byte.
 */
export const demoDiagrams: { id: string; title: string; diagram: Diagram }[] = [
  { id: 'positioning-axis', title: positioningAxis.title, diagram: positioningAxis },
  { id: 'heating-cascade', title: heatingCascade.title, diagram: heatingCascade },
  { id: 'supply-loop', title: supplyLoop.title, diagram: supplyLoop },
  { id: 'sampled-axis', title: sampledAxis.title, diagram: sampledAxis },
];
