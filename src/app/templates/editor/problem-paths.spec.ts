import { smallDocument } from './editor-testing';
import { describeTarget, documentPath, fieldMatches, targetOf } from './problem-paths';

describe('problem paths', () => {
  const doc = smallDocument();

  it('drops the API’s content prefix', () => {
    expect(documentPath('content.components[3].nodes[1]')).toBe('components[3].nodes[1]');
    expect(documentPath('content')).toBe('');
    expect(documentPath('components[0]')).toBe('components[0]');
  });

  it('places paths on items by key with the field inside', () => {
    expect(targetOf('content.components[1].nominal', doc)).toEqual({ kind: 'component', key: 'c-r2', stageKey: 'st-a', field: 'nominal' });
    expect(targetOf('content.testPoints[1].expected.ohms', doc)).toEqual({ kind: 'test-point', key: 'tp-2', stageKey: 'st-a', field: 'expected.ohms' });
    expect(targetOf('content.stages[0].sockets[0].tubeType', doc)).toEqual({ kind: 'socket', stageKey: 'st-a', key: 'so-a', field: 'tubeType' });
    expect(targetOf('content.stages[0].name', doc)).toEqual({ kind: 'stage', key: 'st-a', field: 'name' });
    expect(targetOf('content.chassis.yearFrom', doc)).toEqual({ kind: 'chassis', field: 'yearFrom' });
    expect(targetOf('content.junctions[0].name', doc)).toEqual({ kind: 'junction', index: 0, field: 'name' });
  });

  it('keeps a path to an item that is not there as a document problem', () => {
    expect(targetOf('content.components[9].nominal', doc)).toEqual({ kind: 'document', field: 'components[9].nominal' });
    expect(targetOf('content.format', doc)).toEqual({ kind: 'document', field: 'format' });
  });

  it('matches a field and what is under it, not a field that only starts alike', () => {
    expect(fieldMatches('nodes[1]', 'nodes')).toBeTrue();
    expect(fieldMatches('capacitor.uF', 'capacitor')).toBeTrue();
    expect(fieldMatches('nominal', 'nominal')).toBeTrue();
    expect(fieldMatches('nominalText', 'nominal')).toBeFalse();
  });

  it('describes where a problem is in words', () => {
    expect(describeTarget(targetOf('components[1].nodes[0]', doc), doc)).toBe('R2 · nodes[0]');
    expect(describeTarget(targetOf('testPoints[2]', doc), doc)).toBe('Test point 3');
  });
});
