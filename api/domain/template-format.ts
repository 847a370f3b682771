/**
 * The chassis template document, format "driftmark-template", formatVersion 1 (our own format;
 * DESIGN.md §2 words). A template version's whole content is one such document. The tube-type
 * record of the shared library is described here too, since the document's sockets name tube
 * types and the chassis network is assembled from both.
 *
 * Keys (`st-…`, `so-…`, `c-…`, `tp-…`) are stable: generated once and kept across versions and
 * copies (history and diffs join on them).
 *
 * Pure TypeScript: no framework or Node-only imports (the Angular app imports this module).
 */
import { COMPONENT_KINDS, type ComponentKind, type ValueSource } from './words';

export const TEMPLATE_FORMAT = 'driftmark-template' as const;
export const TEMPLATE_FORMAT_VERSION = 1 as const;

// ---------------------------------------------------------------------------------------------
// Chassis

export const CHASSIS_KINDS = ['table-radio', 'console', 'portable', 'communications-receiver', 'amplifier', 'other'] as const;
export type ChassisKind = (typeof CHASSIS_KINDS)[number];

export const POWER_ARRANGEMENTS = ['transformer', 'autotransformer', 'ac-dc', 'battery'] as const;
export type PowerArrangement = (typeof POWER_ARRANGEMENTS)[number];

/** Power arrangements whose chassis is hot (live to the mains) by the circuit itself. */
export const HOT_CHASSIS_POWER: readonly PowerArrangement[] = ['ac-dc', 'autotransformer'];

/** Hot chassis follows from the power arrangement unless the author sets it explicitly. */
export function hotChassisFor(power: PowerArrangement): boolean {
  return HOT_CHASSIS_POWER.includes(power);
}

export const SOURCE_DOCUMENT_KINDS = ['service-data', 'schematic', 'parts-list', 'known-good-set', 'other'] as const;
export type SourceDocumentKind = (typeof SOURCE_DOCUMENT_KINDS)[number];

export interface SourceDocument {
  title: string;
  kind: SourceDocumentKind;
  note: string;
}

export interface ChassisInfo {
  maker: string;
  model: string;
  chassisNumber: string;
  /** Production variants (chassis suffixes, factory changes). */
  variants: string[];
  yearFrom: number | null;
  yearTo: number | null;
  kind: ChassisKind;
  power: PowerArrangement;
  /** Follows from `power` (ac-dc, autotransformer ⇒ true) unless set explicitly. */
  hotChassis: boolean;
  /** E.g. asbestos heat shield, selenium rectifier fumes. */
  hazardNotes: string;
  sources: SourceDocument[];
}

// ---------------------------------------------------------------------------------------------
// Conditions

/** The template's default measuring conditions. */
export interface TemplateConditions {
  tubesIn: boolean;
  speakerConnected: boolean;
  /** Control and switch positions, as the service data states them. */
  controls: string;
}

/** A test point's own conditions; a missing field takes the template's. */
export type TestConditions = Partial<TemplateConditions>;

// ---------------------------------------------------------------------------------------------
// Stages, sockets, junctions

export interface Socket {
  key: string;
  /** V1, V2 … */
  designator: string;
  /** A tube type's designation in the shared library (e.g. `12BE6`). */
  tubeType: string;
}

export interface Stage {
  key: string;
  name: string;
  sockets: Socket[];
}

/** A named point of the circuit that is not a pin (B+1, the AVC line, a tag strip lug). */
export interface Junction {
  name: string;
  note: string;
}

// ---------------------------------------------------------------------------------------------
// Components

/** A nominal value: ohms (with the text as typed or printed), or a state as charts print it. */
export type Nominal = { ohms: number; text?: string } | { state: 'open' | 'short' };

/** A critical position's own band, in signed percent (−5 and +5 for ±5 %). */
export interface CriticalBand {
  lowPct: number;
  highPct: number;
}

/** Where a pot's wiper sits: the node it drives and the fraction of the track from nodes[0]. */
export interface Wiper {
  node: string;
  /** 0 = at nodes[0], 1 = at nodes[1]. */
  fraction: number;
}

export const DIELECTRICS = ['electrolytic', 'paper', 'wax-paper', 'oil-paper', 'mica', 'ceramic', 'film', 'other'] as const;
export type Dielectric = (typeof DIELECTRICS)[number];

export const SAFETY_CLASSES = ['X', 'Y'] as const;
export type SafetyClass = (typeof SAFETY_CLASSES)[number];

/** One section of a multi-section can: the can, the section letter and the common return node. */
export interface CanSection {
  id: string;
  section: string;
  commonReturn: string;
}

/** The capacitor list entry of a component of kind `capacitor`. */
export interface CapacitorInfo {
  uF: number;
  workingVolts: number;
  dielectric: Dielectric;
  polarised: boolean;
  can: CanSection | null;
  /** X across the line, Y line to chassis; null when not line-connected. */
  safetyClass: SafetyClass | null;
  lineConnected: boolean;
}

/**
 * Component kinds of the document: the DESIGN.md §2 kinds plus `wire`, a 0-Ω link between two
 * tie points (pin to pin, e.g. the links of a series heater string, or a cathode wired to B−).
 * Without it two wired pins could only be one node under two names. `wire` is an addition of
 * this format to the §2 list (proposed for words.ts); its nominal is `{ state: 'short' }`.
 */
export const TEMPLATE_COMPONENT_KINDS = [...COMPONENT_KINDS, 'wire'] as const;
export type TemplateComponentKind = ComponentKind | 'wire';

export interface Component {
  key: string;
  /** R12, C8, T2 … (a wire: W1, W2 …) */
  ref: string;
  kind: TemplateComponentKind;
  stageKey: string;
  /** Node names: `<designator>.<pin>`, `chassis`, `B-`, `B+`, or a junction name. */
  nodes: [string, string];
  /** Pots only. */
  wiper: Wiper | null;
  nominal: Nominal;
  tolerancePct: number | null;
  ratedWatts: number | null;
  ratedVolts: number | null;
  /** The voltage across the part from the service data (for dissipation). */
  voltsAcross: number | null;
  critical: CriticalBand | null;
  fuseRole: boolean;
  mainsSide: boolean;
  nonLinear: boolean;
  valueSource: ValueSource;
  /** Kind `capacitor` only. */
  capacitor: CapacitorInfo | null;
  note: string;
}

// ---------------------------------------------------------------------------------------------
// Test points (list order = bench order)

export type Expected = { ohms: number } | { state: 'open' | 'short' };

/** Across one component: expected = its nominal ± tolerance. */
export interface ComponentCheck {
  key: string;
  stageKey: string;
  kind: 'component-check';
  componentKey: string;
}

/** Between two nodes: the in-circuit value the service data prints, with the chart's tolerance. */
export interface ChartReading {
  key: string;
  stageKey: string;
  kind: 'chart-reading';
  from: string;
  to: string;
  expected: Expected;
  tolerancePct: number;
  conditions: TestConditions;
  valueSource: ValueSource;
}

/** Two matched positions (test point keys): the verdict is on their ratio. */
export interface PairRelation {
  key: string;
  stageKey: string;
  kind: 'pair-relation';
  a: string;
  b: string;
  ratioTolerancePct: number;
}

export type TestPoint = ComponentCheck | ChartReading | PairRelation;
export const TEST_POINT_KINDS = ['component-check', 'chart-reading', 'pair-relation'] as const;
export type TestPointKind = (typeof TEST_POINT_KINDS)[number];

// ---------------------------------------------------------------------------------------------
// The document

export interface TemplateDocument {
  format: typeof TEMPLATE_FORMAT;
  formatVersion: typeof TEMPLATE_FORMAT_VERSION;
  chassis: ChassisInfo;
  conditions: TemplateConditions;
  stages: Stage[];
  junctions: Junction[];
  components: Component[];
  testPoints: TestPoint[];
}

/** A problem found in a document, located by its JSON path (`components[3].nodes[1]`). */
export interface TemplateProblem {
  path: string;
  message: string;
}

// ---------------------------------------------------------------------------------------------
// Tube types (shared library)

/** Base names: the keys of the base-geometry table (api/domain/base-geometry.ts). */
export const BASE_NAMES = [
  'miniature-7',
  'noval',
  'magnoval',
  'octal',
  'loctal',
  'large-4',
  'large-5',
  'large-6',
  'large-7-small',
  'large-7-large',
] as const;
export type BaseName = (typeof BASE_NAMES)[number];

export const HEATING_KINDS = ['indirect', 'direct'] as const;
export type Heating = (typeof HEATING_KINDS)[number];

/**
 * Electrode codes of a pin. `g` is a triode's grid, `g1`…`g5` a multigrid tube's grids,
 * `d` a diode plate, `h`/`f` heater/filament ends, `hct`/`fct` a centre tap, `htap` another tap
 * of a tapped heater (e.g. a pilot-lamp tap), `s` an internal shield, `NC` no connection (usable
 * as a tie point), `IC` internally connected (never a tie point). A dual tube's sections are told
 * apart by the pin's label.
 */
export const ELECTRODES = ['p', 'g', 'g1', 'g2', 'g3', 'g4', 'g5', 'k', 'd', 'h', 'hct', 'htap', 'f', 'fct', 's', 'NC', 'IC'] as const;
export type Electrode = (typeof ELECTRODES)[number];

export interface TubePin {
  pin: number;
  electrode: Electrode;
  /** Words for the screen: "plate", "grid 1", "plate (section 2)". */
  label: string;
}

export interface TubeTypeRecord {
  /** Unique, e.g. `12BE6`. */
  designation: string;
  base: BaseName;
  heating: Heating;
  heaterVolts: number;
  heaterAmps: number;
  pins: TubePin[];
  /** Internally joined pin pairs that ARE one node (never IC pins). */
  ties: [number, number][];
  notes: string;
}

// ---------------------------------------------------------------------------------------------
// Node names

/** The fixed node names besides pins and junctions. */
export const FIXED_NODES = ['chassis', 'B-', 'B+'] as const;
export type FixedNode = (typeof FIXED_NODES)[number];

export type ParsedNode =
  | { kind: 'pin'; designator: string; pin: number }
  | { kind: 'fixed'; name: FixedNode }
  | { kind: 'other'; name: string };

const PIN_NODE = /^([A-Za-z]+[0-9]+[A-Za-z]?)\.([1-9][0-9]?)$/;

/** Reads a node name: `V3.7` → pin 7 of V3; `chassis`, `B-`, `B+`; anything else → other (a junction, if declared). */
export function parseNodeName(name: string): ParsedNode {
  if ((FIXED_NODES as readonly string[]).includes(name)) return { kind: 'fixed', name: name as FixedNode };
  const m = PIN_NODE.exec(name);
  if (m !== null) return { kind: 'pin', designator: m[1], pin: Number(m[2]) };
  return { kind: 'other', name };
}

/** `V3` and 7 → `V3.7`. */
export function pinNode(designator: string, pin: number): string {
  return `${designator}.${pin}`;
}
