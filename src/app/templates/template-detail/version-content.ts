import { ChangeDetectionStrategy, Component, computed, input, signal } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { baseGeometry } from '@domain/base-geometry';
import type { Component as Part, TemplateDocument, TestPoint, TubePin } from '@domain/template-format';
import { SocketView } from '../../shared/socket-view/socket-view';
import { TemplateFiles } from '../files/template-files';
import {
  TEST_POINT_KIND_LABELS,
  VALUE_SOURCE_LABELS,
  capacitorsOf,
  conditionsText,
  expectedText,
  kindWords,
  nominalText,
  testPointEnds,
  testPointTolerance,
  toleranceText,
} from '../template-words';
import { TubeType } from '../templates-api';

interface SocketRow {
  key: string;
  designator: string;
  tubeType: string;
  tube: TubeType | null;
  baseLabel: string;
}

/** A read-only view of one version's document: stages with sockets, components, test points, capacitors. */
@Component({
  selector: 'dm-version-content',
  imports: [MatIconModule, SocketView, TemplateFiles],
  templateUrl: './version-content.html',
  styleUrl: './version-content.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VersionContent {
  readonly content = input.required<TemplateDocument>();
  /** The tube types the sockets name, by designation (missing: not in the library). */
  readonly tubes = input<ReadonlyMap<string, TubeType>>(new Map());
  /** The template whose stage files are shown under each stage (none when null). */
  readonly templateId = input<number | null>(null);
  /** The owner uploads, moves and deletes stage files here too. */
  readonly canEditFiles = input(false);

  protected readonly tpKinds = TEST_POINT_KIND_LABELS;
  protected readonly valueSources = VALUE_SOURCE_LABELS;
  protected readonly kindWords = kindWords;
  protected readonly nominalText = nominalText;
  protected readonly toleranceText = toleranceText;
  /** The pin chosen on a socket drawing: its test points are listed. */
  protected readonly chosenPin = signal<{ socket: string; pin: TubePin } | null>(null);

  protected readonly stages = computed(() => {
    const doc = this.content();
    const tubes = this.tubes();
    return doc.stages.map((s) => ({
      key: s.key,
      name: s.name,
      sockets: s.sockets.map<SocketRow>((so) => {
        const tube = tubes.get(so.tubeType.toUpperCase()) ?? null;
        return { key: so.key, designator: so.designator, tubeType: so.tubeType, tube, baseLabel: tube ? (baseGeometry(tube.base)?.label ?? tube.base) : '' };
      }),
      components: doc.components.filter((c) => c.stageKey === s.key).length,
      testPoints: doc.testPoints.filter((t) => t.stageKey === s.key).length,
    }));
  });

  protected readonly stageChoices = computed(() => this.content().stages.map((s) => ({ key: s.key, name: s.name })));
  protected readonly stageNames = computed(() => new Map(this.content().stages.map((s) => [s.key, s.name])));
  protected readonly capacitors = computed(() => capacitorsOf(this.content()));
  protected readonly pinPoints = computed(() => {
    const chosen = this.chosenPin();
    if (!chosen) return [];
    const node = `${chosen.socket}.${chosen.pin.pin}`;
    const doc = this.content();
    return doc.testPoints
      .map((t, i) => ({ t, n: i + 1 }))
      .filter(({ t }) => this.nodesOf(t).includes(node))
      .map(({ t, n }) => `${n}. ${TEST_POINT_KIND_LABELS[t.kind]}: ${testPointEnds(t, doc)}`);
  });

  protected ends(tp: TestPoint): string {
    return testPointEnds(tp, this.content());
  }
  protected expected(tp: TestPoint): string {
    return expectedText(tp, this.content());
  }
  protected tolerance(tp: TestPoint): string {
    return testPointTolerance(tp, this.content());
  }
  protected conditions(tp: TestPoint): string {
    return tp.kind === 'chart-reading' ? conditionsText(tp.conditions, this.content()) : '';
  }
  protected source(tp: TestPoint): string {
    if (tp.kind === 'chart-reading') return VALUE_SOURCE_LABELS[tp.valueSource];
    if (tp.kind === 'component-check') {
      const c = this.content().components.find((x) => x.key === tp.componentKey);
      return c ? VALUE_SOURCE_LABELS[c.valueSource] : '';
    }
    return '';
  }
  protected flags(c: Part): string {
    const out: string[] = [];
    if (c.critical) out.push(`critical ${c.critical.lowPct} %/+${c.critical.highPct} %`);
    if (c.fuseRole) out.push('fuse role');
    if (c.mainsSide) out.push('mains side');
    if (c.nonLinear) out.push('non-linear');
    if (c.wiper) out.push(`wiper at ${Math.round(c.wiper.fraction * 100)} % to ${c.wiper.node}`);
    return out.join(', ');
  }
  protected choosePin(socket: string, pin: TubePin): void {
    this.chosenPin.set({ socket, pin });
  }

  private nodesOf(t: TestPoint): string[] {
    if (t.kind === 'chart-reading') return [t.from, t.to];
    if (t.kind === 'component-check') return [...(this.content().components.find((c) => c.key === t.componentKey)?.nodes ?? [])];
    return [];
  }
}
