/** The planned network as the matching code sees it: plain data in WGS 84, lon/lat order. */

export type LonLat = [number, number];

export type RouteKind = 'street' | 'crossing';

export interface PlannedRouteInput {
  /** the design's route reference, stable across plan revisions (e.g. 'R-104') */
  ref: string;
  street: string | null;
  /** the planned duct bundle as the design names it, e.g. '7x14mm + 1x16mm' */
  ducts: string | null;
  kind: RouteKind;
  coords: LonLat[];
}

export interface GraphNode {
  id: number;
  position: LonLat;
  /** routes meeting here, with the chainage (m) on each */
  routes: { ref: string; chainageM: number }[];
}

export interface GraphEdge {
  ref: string;
  fromNode: number;
  toNode: number;
  fromChainageM: number;
  toChainageM: number;
  lengthM: number;
}

export type DiagnosticKind = 'dangling_end' | 'duplicate' | 'overlap' | 'zero_length' | 'duplicate_ref';

export interface Diagnostic {
  kind: DiagnosticKind;
  refs: string[];
  /** where to look */
  position: LonLat;
  message: string;
}

export interface RouteGraph {
  nodes: GraphNode[];
  /** each route split at its junctions */
  edges: GraphEdge[];
  diagnostics: Diagnostic[];
}

export interface PlanChange {
  added: string[];
  removed: string[];
  reshaped: string[];
  unchanged: string[];
  /** street, ducts or kind changed without a new geometry */
  retagged: string[];
}
