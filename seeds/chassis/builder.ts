/**
 * A small builder for the demo chassis templates: writes each part once, derives stable keys from
 * the chassis prefix and the reference (`c-kst5-r12`, `tp-kst5-r12`), and lays the test points out
 * in bench order, stage by stage (the component checks of a stage in the order its parts were
 * written, then its chart readings and pair relations).
 */
import type {
  CapacitorInfo,
  ChassisInfo,
  Component,
  Expected,
  Junction,
  Stage,
  TemplateConditions,
  TemplateDocument,
  TestConditions,
  TestPoint,
} from '../../api/domain/template-format';
import type { ValueSource } from '../../api/domain/words';

export type PartOptions = Partial<Omit<Component, 'key' | 'ref' | 'kind' | 'stageKey' | 'nodes' | 'nominal'>>;

/** `470000` → `470k`, `2200000` → `2.2M`, `27` → `27`. */
export function ohmsText(ohms: number): string {
  const fmt = (x: number): string => String(+x.toPrecision(4));
  if (ohms >= 1e6) return `${fmt(ohms / 1e6)}M`;
  if (ohms >= 1e3) return `${fmt(ohms / 1e3)}k`;
  return fmt(ohms);
}

const slug = (s: string): string => s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');

export class ChassisBuilder {
  private readonly stages: Stage[] = [];
  private readonly junctions: Junction[] = [];
  private readonly components: Component[] = [];
  private readonly extraPoints = new Map<string, TestPoint[]>();
  private current = '';

  constructor(
    private readonly prefix: string,
    private readonly chassis: ChassisInfo,
    private readonly conditions: TemplateConditions,
  ) {}

  /** Starts a stage; the parts written next belong to it. Sockets as [designator, tube type]. */
  stage(n: number, name: string, sockets: [string, string][] = []): this {
    const key = `st-${this.prefix}-${n}`;
    this.stages.push({ key, name, sockets: sockets.map(([designator, tubeType]) => ({ key: `so-${this.prefix}-${slug(designator)}`, designator, tubeType })) });
    this.extraPoints.set(key, []);
    this.current = key;
    return this;
  }

  junction(name: string, note: string): this {
    this.junctions.push({ name, note });
    return this;
  }

  part(ref: string, kind: Component['kind'], a: string, b: string, nominal: number | 'open' | 'short', options: PartOptions = {}): Component {
    const c: Component = {
      key: `c-${this.prefix}-${slug(ref)}`,
      ref,
      kind,
      stageKey: this.current,
      nodes: [a, b],
      wiper: null,
      nominal: typeof nominal === 'number' ? { ohms: nominal, text: ohmsText(nominal) } : { state: nominal },
      tolerancePct: null,
      ratedWatts: null,
      ratedVolts: null,
      voltsAcross: null,
      critical: null,
      fuseRole: false,
      mainsSide: false,
      nonLinear: false,
      valueSource: 'schematic',
      capacitor: null,
      note: '',
      ...options,
    };
    this.components.push(c);
    return c;
  }

  /** A resistor: ohms, tolerance %, rated watts, volts across from the service data. */
  r(ref: string, a: string, b: string, ohms: number, tolerancePct: number, ratedWatts: number, voltsAcross: number | null, options: PartOptions = {}): Component {
    return this.part(ref, 'carbon-composition', a, b, ohms, { tolerancePct, ratedWatts, voltsAcross, ...options });
  }

  /** A winding (transformer, choke, coil, voice coil) with its DC resistance. */
  winding(ref: string, a: string, b: string, ohms: number, note: string, options: PartOptions = {}): Component {
    return this.part(ref, 'winding', a, b, ohms, { tolerancePct: 20, note, ...options });
  }

  /** A heater (or a section of one) with its cold resistance as measured on a known-good set. */
  heater(ref: string, a: string, b: string, coldOhms: number, note: string): Component {
    return this.part(ref, 'heater', a, b, coldOhms, { tolerancePct: 20, valueSource: 'known-good-set', note });
  }

  wire(ref: string, a: string, b: string, note = ''): Component {
    return this.part(ref, 'wire', a, b, 'short', { note });
  }

  cap(ref: string, a: string, b: string, capacitor: Partial<CapacitorInfo> & Pick<CapacitorInfo, 'uF' | 'workingVolts' | 'dielectric'>, options: PartOptions = {}): Component {
    const info: CapacitorInfo = { polarised: capacitor.dielectric === 'electrolytic', can: null, safetyClass: null, lineConnected: false, ...capacitor };
    return this.part(ref, 'capacitor', a, b, 'open', { capacitor: info, tolerancePct: null, ...options });
  }

  /** A chart reading of the current stage. */
  chart(from: string, to: string, expected: Expected, tolerancePct: number, conditions: TestConditions = {}, valueSource: ValueSource = 'service-data'): this {
    return this.chartIn(this.current, from, to, expected, tolerancePct, conditions, valueSource);
  }

  /** The key of stage n of this chassis. */
  stageKey(n: number): string {
    return `st-${this.prefix}-${n}`;
  }

  /** A chart reading of a given stage (by key). */
  chartIn(stageKey: string, from: string, to: string, expected: Expected, tolerancePct: number, conditions: TestConditions = {}, valueSource: ValueSource = 'service-data'): this {
    const points = this.extraPoints.get(stageKey);
    if (points === undefined) throw new Error(`no stage ${stageKey}`);
    points.push({
      key: `tp-${this.prefix}-ch-${slug(from)}-${slug(to)}${conditions.tubesIn === false ? '-out' : ''}`,
      stageKey,
      kind: 'chart-reading',
      from,
      to,
      expected,
      tolerancePct,
      conditions,
      valueSource,
    });
    return this;
  }

  /** A pair relation between the component checks of two matched parts (refs) of the current stage. */
  pair(refA: string, refB: string, ratioTolerancePct: number): this {
    this.extraPoints.get(this.current)!.push({
      key: `tp-${this.prefix}-pair-${slug(refA)}-${slug(refB)}`,
      stageKey: this.current,
      kind: 'pair-relation',
      a: `tp-${this.prefix}-${slug(refA)}`,
      b: `tp-${this.prefix}-${slug(refB)}`,
      ratioTolerancePct,
    });
    return this;
  }

  /** The document: component checks for every part but wires, stage by stage, then each stage's chart readings and pairs. */
  build(): TemplateDocument {
    const testPoints: TestPoint[] = [];
    for (const s of this.stages) {
      for (const c of this.components) {
        if (c.stageKey !== s.key || c.kind === 'wire') continue;
        testPoints.push({ key: `tp-${this.prefix}-${slug(c.ref)}`, stageKey: s.key, kind: 'component-check', componentKey: c.key });
      }
      testPoints.push(...this.extraPoints.get(s.key)!);
    }
    return {
      format: 'driftmark-template',
      formatVersion: 1,
      chassis: this.chassis,
      conditions: this.conditions,
      stages: this.stages,
      junctions: this.junctions,
      components: this.components,
      testPoints,
    };
  }
}
