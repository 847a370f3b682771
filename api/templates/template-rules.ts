/**
 * The domain rules of a template document beyond its shape (template-schema.ts checks the shape
 * first): keys unique, every stage named by a component or test point exists, every node is a
 * pin of a socket whose tube type has that pin (never an IC pin), `chassis`, `B-`, `B+` or a
 * declared junction, nominal texts read by the notation module agree with their ohms, component
 * checks point at components and pair relations at test points. Every problem is reported with
 * its path; nothing stops at the first.
 */
import { parseResistance } from '../domain/notation';
import { parseNodeName, type TemplateDocument, type TemplateProblem, type TubePin } from '../domain/template-format';

export interface TubeTypePins {
  pins: readonly TubePin[];
}

/** The tube types a document names, upper-case designations. */
export function tubeTypesOf(doc: TemplateDocument): string[] {
  return [...new Set(doc.stages.flatMap((s) => s.sockets.map((so) => so.tubeType)))].sort();
}

export function ruleProblems(doc: TemplateDocument, tubeTypes: ReadonlyMap<string, TubeTypePins>, prefix = ''): TemplateProblem[] {
  const out: TemplateProblem[] = [];
  const at = (path: string) => (prefix ? `${prefix}.${path}` : path);
  const problem = (path: string, message: string) => out.push({ path: at(path), message });

  const c = doc.chassis;
  if (c.yearFrom !== null && c.yearTo !== null && c.yearFrom > c.yearTo) problem('chassis.yearTo', `is before yearFrom (${c.yearFrom}).`);

  /** Reports the second and later uses of a value; returns the first path of each value. */
  const unique = <T>(items: readonly T[], valueOf: (t: T) => string, pathOf: (i: number) => string, what: string) => {
    const first = new Map<string, string>();
    items.forEach((it, i) => {
      const v = valueOf(it);
      const prev = first.get(v);
      if (prev !== undefined) problem(pathOf(i), `${what} "${v}" is used already at ${at(prev)}.`);
      else first.set(v, pathOf(i));
    });
    return first;
  };

  const stageKeys = unique(doc.stages, (s) => s.key, (i) => `stages[${i}].key`, 'The stage key');
  const sockets = doc.stages.flatMap((s, i) => s.sockets.map((so, j) => ({ so, path: `stages[${i}].sockets[${j}]` })));
  unique(sockets, (x) => x.so.key, (i) => `${sockets[i].path}.key`, 'The socket key');
  unique(sockets, (x) => x.so.designator.toUpperCase(), (i) => `${sockets[i].path}.designator`, 'The designator');
  const socketByDesignator = new Map<string, (typeof sockets)[number]>();
  for (const x of sockets) {
    if (!socketByDesignator.has(x.so.designator)) socketByDesignator.set(x.so.designator, x);
    if (!tubeTypes.has(x.so.tubeType)) problem(`${x.path}.tubeType`, `names tube type "${x.so.tubeType}", which is not in the tube-type library.`);
  }

  unique(doc.junctions, (j) => j.name, (i) => `junctions[${i}].name`, 'The junction name');
  const junctions = new Set<string>();
  doc.junctions.forEach((j, i) => {
    const parsed = parseNodeName(j.name);
    if (parsed.kind === 'fixed') problem(`junctions[${i}].name`, `"${j.name}" is a fixed node already; it needs no junction.`);
    else if (parsed.kind === 'pin') problem(`junctions[${i}].name`, `"${j.name}" reads as a socket pin; name a junction otherwise (e.g. "B+1", "AVC").`);
    else junctions.add(j.name);
  });

  const checkNode = (name: string, path: string) => {
    const parsed = parseNodeName(name);
    if (parsed.kind === 'fixed') return;
    if (parsed.kind === 'other') {
      if (!junctions.has(name)) problem(path, `"${name}" is neither a pin (like "V3.7"), chassis, B-, B+ nor a declared junction.`);
      return;
    }
    const socket = socketByDesignator.get(parsed.designator);
    if (!socket) {
      problem(path, `"${name}" names socket ${parsed.designator}, which no stage has.`);
      return;
    }
    const tube = tubeTypes.get(socket.so.tubeType);
    if (!tube) return; // reported at the socket
    const pin = tube.pins.find((p) => p.pin === parsed.pin);
    if (!pin) problem(path, `"${name}": tube type ${socket.so.tubeType} has no pin ${parsed.pin}.`);
    else if (pin.electrode === 'IC') problem(path, `"${name}": pin ${parsed.pin} of ${socket.so.tubeType} is internally connected (IC) and is never a tie point.`);
  };

  const checkStage = (stageKey: string, path: string) => {
    if (!stageKeys.has(stageKey)) problem(path, `names stage "${stageKey}", which the template does not have.`);
  };

  unique(doc.components, (x) => x.key, (i) => `components[${i}].key`, 'The component key');
  unique(doc.components, (x) => x.ref.toUpperCase(), (i) => `components[${i}].ref`, 'The reference');
  const componentKeys = new Set(doc.components.map((x) => x.key));
  doc.components.forEach((x, i) => {
    const p = `components[${i}]`;
    checkStage(x.stageKey, `${p}.stageKey`);
    x.nodes.forEach((n, k) => checkNode(n, `${p}.nodes[${k}]`));
    if (x.nodes[0] === x.nodes[1]) problem(`${p}.nodes[1]`, `is the same node as nodes[0] ("${x.nodes[0]}"): a component joins two different nodes.`);
    if (x.wiper) {
      if (x.kind !== 'pot') problem(`${p}.wiper`, 'only a pot has a wiper.');
      checkNode(x.wiper.node, `${p}.wiper.node`);
    }
    if ('ohms' in x.nominal && x.nominal.text !== undefined) {
      const parsed = parseResistance(x.nominal.text);
      if (!parsed.ok) problem(`${p}.nominal.text`, parsed.message);
      else if (parsed.state !== 'value' || parsed.ohms === null) problem(`${p}.nominal.text`, `"${x.nominal.text}" is a state, not a value: write the nominal as { "state": … }.`);
      else if (Math.abs(parsed.ohms - x.nominal.ohms) > 1e-9 * x.nominal.ohms) problem(`${p}.nominal.text`, `"${x.nominal.text}" reads ${parsed.display}, which is not the nominal's ${x.nominal.ohms} Ω.`);
    }
    if (x.kind === 'wire' && !('state' in x.nominal && x.nominal.state === 'short')) problem(`${p}.nominal`, 'a wire is a 0-Ω link: its nominal is { "state": "short" }.');
    if (x.kind === 'capacitor' && !x.capacitor) problem(`${p}.capacitor`, 'is required for a capacitor (µF, working volts, dielectric …).');
    if (x.kind !== 'capacitor' && x.capacitor) problem(`${p}.capacitor`, 'only a component of kind capacitor carries capacitor data.');
    if (x.capacitor?.can) checkNode(x.capacitor.can.commonReturn, `${p}.capacitor.can.commonReturn`);
  });

  unique(doc.testPoints, (t) => t.key, (i) => `testPoints[${i}].key`, 'The test point key');
  const testPoints = new Map(doc.testPoints.map((t) => [t.key, t]));
  doc.testPoints.forEach((t, i) => {
    const p = `testPoints[${i}]`;
    checkStage(t.stageKey, `${p}.stageKey`);
    if (t.kind === 'component-check') {
      if (!componentKeys.has(t.componentKey)) problem(`${p}.componentKey`, `names component "${t.componentKey}", which the template does not have.`);
    } else if (t.kind === 'chart-reading') {
      checkNode(t.from, `${p}.from`);
      checkNode(t.to, `${p}.to`);
      if (t.from === t.to) problem(`${p}.to`, `is the same node as from ("${t.from}").`);
    } else {
      for (const side of ['a', 'b'] as const) {
        const other = testPoints.get(t[side]);
        if (!other) problem(`${p}.${side}`, `names test point "${t[side]}", which the template does not have.`);
        else if (other.kind === 'pair-relation') problem(`${p}.${side}`, `names "${t[side]}", itself a pair relation: a pair relates two measured positions.`);
      }
      if (t.a === t.b) problem(`${p}.b`, 'is the same test point as a.');
    }
  });
  return out;
}
