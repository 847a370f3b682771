import { EditorStore } from './editor-store';
import { SIX_AV6, smallDocument } from './editor-testing';
import { inCircuitText, parallelRefs } from './expected-words';

function loaded(): EditorStore {
  const store = new EditorStore();
  store.setTubeTypes([SIX_AV6]);
  store.load(7, { templateId: 7, exists: true, revision: 4, basedOn: null, content: smallDocument() });
  return store;
}

const KEY = /^(st|so|c|tp)-[A-Za-z0-9_-]{1,40}$/;

describe('EditorStore', () => {
  it('loads a draft clean, and an edit makes it dirty', () => {
    const store = loaded();
    expect(store.dirty()).toBeFalse();
    expect(store.revision()).toBe(4);
    store.updateStage('st-a', { name: 'Detector and first audio' });
    expect(store.dirty()).toBeTrue();
    expect(store.doc()!.stages[0].name).toBe('Detector and first audio');
  });

  it('adds a stage and a component with new keys of the format', () => {
    const store = loaded();
    const st = store.addStage('Output');
    const c = store.addComponent(st, { ref: 'R9' });
    expect(st).toMatch(KEY);
    expect(st.startsWith('st-')).toBeTrue();
    expect(c.startsWith('c-')).toBeTrue();
    expect(store.doc()!.components.find((x) => x.key === c)!.stageKey).toBe(st);
    expect(store.selection()).toEqual({ kind: 'stage', stageKey: st });
  });

  it('removes a component with its component check, and keeps the others', () => {
    const store = loaded();
    store.removeComponent('c-r1');
    const doc = store.doc()!;
    expect(doc.components.map((c) => c.ref)).toEqual(['R2', 'R3', 'W1']);
    expect(doc.testPoints.map((t) => t.key)).toEqual(['tp-2', 'tp-3']);
  });

  it('removing a test point drops the pair relations that name it; the other points stay', () => {
    const store = loaded();
    const pair = store.addTestPoint('st-a', { kind: 'pair-relation', a: 'tp-1', b: 'tp-3' });
    expect(store.doc()!.testPoints.some((t) => t.key === pair)).toBeTrue();
    store.removeTestPoint('tp-3');
    expect(store.doc()!.testPoints.map((t) => t.key)).toEqual(['tp-1', 'tp-2']);
  });

  it('duplicates a stage with new keys, the socket renumbered, nodes and refs moved, test points re-pointed', () => {
    const store = loaded();
    const before = store.doc()!;
    const st = store.duplicateStage('st-a')!;
    const doc = store.doc()!;
    expect(doc.stages.map((s) => s.name)).toEqual(['First audio', 'First audio (copy)']);
    const copy = doc.stages[1];
    expect(copy.key).toBe(st);
    expect(copy.sockets[0].designator).toBe('V2');
    expect(copy.sockets[0].key).not.toBe('so-a');
    const parts = doc.components.filter((c) => c.stageKey === st);
    expect(parts.map((c) => c.ref)).toEqual(['R4', 'R5', 'R6', 'W2']);
    expect(parts[0].nodes).toEqual(['V2.7', 'B+1']);
    expect(parts[1].nodes).toEqual(['V2.7', 'chassis']);
    const keys = new Set([...before.components.map((c) => c.key), ...before.testPoints.map((t) => t.key)]);
    for (const c of parts) expect(keys.has(c.key)).toBeFalse();
    const points = doc.testPoints.filter((t) => t.stageKey === st);
    expect(points.length).toBe(3);
    const check = points[0];
    expect(check.kind === 'component-check' && check.componentKey).toBe(parts[0].key);
    const chart = points[1];
    expect(chart.kind === 'chart-reading' && chart.from).toBe('V2.7');
    // The original stage is untouched.
    expect(doc.components.filter((c) => c.stageKey === 'st-a').map((c) => c.ref)).toEqual(['R1', 'R2', 'R3', 'W1']);
  });

  it('duplicates a socket with the parts that sit only on it (and fixed nodes), not the ones shared with a junction', () => {
    const store = loaded();
    const so = store.duplicateSocket('st-a', 'so-a')!;
    const doc = store.doc()!;
    expect(doc.stages[0].sockets.map((s) => s.designator)).toEqual(['V1', 'V2']);
    expect(doc.stages[0].sockets[1].key).toBe(so);
    // R2 (V1.7–chassis) and W1 (V1.2–chassis) come along; R1 (to the junction B+1) and R3 do not.
    const added = doc.components.slice(4);
    expect(added.map((c) => [c.ref, ...c.nodes])).toEqual([
      ['R4', 'V2.7', 'chassis'],
      ['W2', 'V2.2', 'chassis'],
    ]);
    // The chart reading V1.7 to chassis and R2's check come along; R1's check does not.
    expect(doc.testPoints.length).toBe(5);
  });

  it('reorders a stage’s test points by index (drag and drop) and keeps other stages’ slots', () => {
    const store = loaded();
    const other = store.addStage('Output');
    store.addTestPoint(other, { kind: 'chart-reading', from: 'V1.1', to: 'chassis' });
    // Put the other stage's point between tp-1 and tp-2 in the whole list.
    const doc = store.doc()!;
    const otherKey = doc.testPoints[3].key;
    store.doc.set({ ...doc, testPoints: [doc.testPoints[0], doc.testPoints[3], doc.testPoints[1], doc.testPoints[2]] });
    store.moveTestPoint('st-a', 0, 2);
    expect(store.doc()!.testPoints.map((t) => t.key)).toEqual(['tp-2', otherKey, 'tp-3', 'tp-1']);
  });

  it('moves a test point one step by keyboard and announces its new place; at the end it says so and moves nothing', () => {
    const store = loaded();
    expect(store.moveTestPointBy('tp-1', 1)).toBe(1);
    expect(store.doc()!.testPoints.map((t) => t.key)).toEqual(['tp-2', 'tp-1', 'tp-3']);
    expect(store.announcement()).toBe('R1 check moved to position 2 of 3.');
    expect(store.moveTestPointBy('tp-3', 1)).toBeNull();
    expect(store.announcement()).toBe('R2 check is already last.');
    expect(store.doc()!.testPoints.map((t) => t.key)).toEqual(['tp-2', 'tp-1', 'tp-3']);
  });

  it('creates component checks for every component in one action, skipping checked ones and wires', () => {
    const store = loaded();
    expect(store.createComponentChecks()).toEqual({ created: 1, skipped: 3 });
    const last = store.doc()!.testPoints.at(-1)!;
    expect(last.kind === 'component-check' && last.componentKey).toBe('c-r3');
    expect(last.stageKey).toBe('st-a');
    // Twice is harmless.
    expect(store.createComponentChecks()).toEqual({ created: 0, skipped: 4 });
  });

  it('lets hot chassis follow the power arrangement, unless it was set explicitly', () => {
    const store = loaded();
    store.updateChassis({ power: 'ac-dc' });
    expect(store.doc()!.chassis.hotChassis).toBeTrue();
    store.updateChassis({ power: 'transformer' });
    expect(store.doc()!.chassis.hotChassis).toBeFalse();
    store.updateChassis({ hotChassis: true }); // explicit: a transformer set wired hot
    store.updateChassis({ power: 'battery' });
    expect(store.doc()!.chassis.hotChassis).toBeTrue();
  });

  it('renaming a socket carries the new designator into the nodes that name it', () => {
    const store = loaded();
    store.updateSocket('st-a', 'so-a', { designator: 'V4' });
    const doc = store.doc()!;
    expect(doc.components[0].nodes).toEqual(['V4.7', 'B+1']);
    const chart = doc.testPoints[1];
    expect(chart.kind === 'chart-reading' && chart.from).toBe('V4.7');
  });

  it('places the API’s 400 problems on their items by key, even after the list is reordered', () => {
    const store = loaded();
    const sent = store.beginSave()!;
    store.saveFailed(
      {
        status: 400,
        code: 'validation',
        message: 'The template has 2 problems',
        details: {
          problems: [
            { path: 'content.components[1].nodes[1]', message: "'chasis' is not a node" },
            { path: 'content.chassis.maker', message: 'is required.' },
          ],
        },
      },
      sent.content,
    );
    expect(store.saving()).toBeFalse();
    store.removeComponent('c-r1'); // R2 is now components[0]: the problem follows its key
    expect(store.problemsAt({ kind: 'component', key: 'c-r2' }, 'nodes[1]').map((p) => p.message)).toEqual(["'chasis' is not a node"]);
    expect(store.problemsAt({ kind: 'component', key: 'c-r2' }, 'nodes').length).toBe(1);
    expect(store.problemsAt({ kind: 'component', key: 'c-r2' }, 'nominal')).toEqual([]);
    expect(store.problemsAt({ kind: 'chassis' }, 'maker').map((p) => p.origin)).toEqual(['server']);
    expect(store.saveMessage()).toContain('2 problems');
  });

  it('keeps a 409 stale revision with both revisions; a good save clears it and takes the new revision', () => {
    const store = loaded();
    store.updateStage('st-a', { name: 'Audio' });
    let req = store.beginSave()!;
    expect(req.revision).toBe(4);
    store.saveFailed({ status: 409, code: 'stale-revision', message: 'changed', details: { yourRevision: 4, currentRevision: 6 } }, req.content);
    expect(store.conflict()).toEqual({ yourRevision: 4, currentRevision: 6, message: 'changed' });
    expect(store.dirty()).toBeTrue();
    req = store.beginSave()!;
    store.saved({ templateId: 7, exists: true, revision: 5, basedOn: null, content: req.content }, req.change);
    expect(store.conflict()).toBeNull();
    expect(store.revision()).toBe(5);
    expect(store.dirty()).toBeFalse();
  });

  it('stays dirty when the page changed while a save was under way', () => {
    const store = loaded();
    store.updateStage('st-a', { name: 'Audio' });
    const req = store.beginSave()!;
    store.updateStage('st-a', { name: 'Audio 2' });
    store.saved({ templateId: 7, exists: true, revision: 5, basedOn: null, content: req.content }, req.change);
    expect(store.dirty()).toBeTrue();
    expect(store.revision()).toBe(5);
  });

  describe('the chassis network in the browser', () => {
    it('gives R1’s in-circuit value with the paths that lower it (worked by hand)', () => {
      // R1 220k between V1.7 and B+1, in parallel with R2 + R3 = 470k + 47k = 517k:
      // 220 × 517 / (220 + 517) = 113 740 / 737 = 154.33 kΩ, 29.85 % below the nominal.
      const store = loaded();
      store.select({ kind: 'stage', stageKey: 'st-a' });
      const r = store.stageReadings().get('tp-1')!;
      expect(r.inCircuitOhms!).toBeCloseTo(154328.36, 1);
      expect(r.loweredByPct!).toBeCloseTo(29.85, 2);
      expect(inCircuitText(r)).toBe('154.3 kΩ');
      expect(parallelRefs(r, store.doc()!).sort()).toEqual(['R2', 'R3']);
    });

    it('flags a chart reading that disagrees with the network beyond its tolerance, not one that agrees', () => {
      // V1.7 to chassis: R2 ∥ (R1 + R3) = 470k ∥ 267k = 125 490 / 737 = 170.27 kΩ.
      const store = loaded();
      expect(store.disagreements().size).toBe(0); // printed 170k ±20 %: agrees
      store.updateTestPoint('tp-2', { expected: { ohms: 250e3 } }); // +46.8 % off
      const d = store.disagreements().get('tp-2')!;
      expect(d.networkOhms!).toBeCloseTo(170271.37, 1);
      expect(d.deviationPct!).toBeCloseTo(-31.89, 1);
    });

    it('lists the network’s problems at their components: an unknown node, a pin the tube does not have', () => {
      const store = loaded();
      expect(store.networkProblems()).toEqual([]);
      store.updateComponent('c-r3', { nodes: ['B+1', 'chasis'] });
      store.updateComponent('c-r2', { nodes: ['V1.9', 'chassis'] });
      const placed = store.networkProblems().map((p) => [p.target.kind, 'key' in p.target ? p.target.key : '', p.target.field]);
      expect(placed).toContain(['component', 'c-r3', 'nodes[1]']);
      expect(placed).toContain(['component', 'c-r2', 'nodes[0]']);
    });
  });
});
