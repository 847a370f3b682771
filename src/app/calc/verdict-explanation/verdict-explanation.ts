import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { VerdictResponse } from '@domain/quick-check';
import { BASIS_LABELS, DECISION_LABELS } from '../calc-words';
import { numberText, ohmsText, pctText } from '../calc-format';

/** One line of the explanation: a term and what it says, in plain words. */
interface Line {
  readonly term: string;
  readonly text: string;
  readonly detail?: string;
}

const SOURCE_WORDS = { critical: 'critical (the position’s own band)', template: 'template', allowance: 'allowance' } as const;

/**
 * The structured explanation of a verdict (DESIGN.md §2 "verdict") in plain words: the band and
 * its source, the range and a, U with its coverage factor k = 2, the rule and its limits, p_c
 * (normal approximation), the thresholds that applied, the method caveat and the notes. Renders
 * the fields; never parses text.
 */
@Component({
  selector: 'dm-verdict-explanation',
  template: `
    <dl class="lines">
      @for (line of lines(); track line.term) {
        <div class="line">
          <dt>{{ line.term }}</dt>
          <dd>
            {{ line.text }}
            @if (line.detail) {
              <span class="detail">{{ line.detail }}</span>
            }
          </dd>
        </div>
      }
    </dl>
    @if (notes().length) {
      <h4>Notes</h4>
      <ul class="notes" data-test="notes">
        @for (n of notes(); track $index) {
          <li>{{ n }}</li>
        }
      </ul>
    }
  `,
  styles: `
    :host { display: block; }
    .lines { margin: 0; display: grid; gap: 6px; }
    .line { display: grid; grid-template-columns: minmax(120px, 10em) 1fr; gap: 12px; }
    dt { font: var(--mat-sys-label-large); color: var(--mat-sys-on-surface-variant); }
    dd { margin: 0; }
    .detail { display: block; font: var(--mat-sys-body-small); color: var(--mat-sys-on-surface-variant); }
    h4 { font: var(--mat-sys-title-small); margin: 12px 0 4px; }
    .notes { margin: 0; padding-inline-start: 20px; }
    @media (max-width: 520px) { .line { grid-template-columns: 1fr; gap: 0; } }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class VerdictExplanation {
  readonly result = input.required<VerdictResponse>();

  protected readonly lines = computed<Line[]>(() => explain(this.result()));
  protected readonly notes = computed(() => {
    const r = this.result();
    return [...r.reading.warnings.map((w) => `Warning: ${w}`), ...r.reading.notes, ...r.explanation.notes.map((n) => n.text)];
  });
}

function explain(r: VerdictResponse): Line[] {
  const e = r.explanation;
  const lines: Line[] = [];
  const b = e.band;
  const pcts = b.lowPct !== null && b.highPct !== null ? ` (${pctText(b.lowPct, 1)} / ${pctText(b.highPct, 1)})` : '';
  lines.push({
    term: 'Band',
    text: `${ohmsText(b.lowOhms)} to ${b.highOhms === null ? 'no upper limit' : ohmsText(b.highOhms)}${pcts}`,
    detail: `Source: ${SOURCE_WORDS[b.source]} — ${BASIS_LABELS[b.basis]}.`,
  });

  if (e.displayedOhms !== null) {
    lines.push({
      term: 'Reading',
      text:
        e.leadOhms > 0 && e.correctedOhms !== null
          ? `${ohmsText(e.displayedOhms, 6)} displayed, less ${ohmsText(e.leadOhms, 3)} of lead resistance: ${ohmsText(e.correctedOhms, 6)} judged`
          : `${ohmsText(e.displayedOhms, 6)}`,
      detail: r.driftPct !== null ? `Drift ${pctText(r.driftPct)} from the nominal.` : undefined,
    });
  } else {
    lines.push({ term: 'Reading', text: `${r.reading.display} — judged by its state, no drift` });
  }

  if (e.range) {
    const rg = e.range;
    const which = `Range ${rg.index + 1}${rg.inferred ? ', inferred from the reading' : ', as recorded'}`;
    const spec =
      'fullScaleOhms' in rg.spec
        ? `shows up to ${ohmsText(rg.spec.fullScaleOhms, 6)}, resolution ${ohmsText(rg.spec.resolutionOhms, 6)}, ±(${numberText(rg.spec.pctOfReading)} % of reading + ${numberText(rg.spec.counts)} counts)`
        : `centre-scale ${ohmsText(rg.spec.centreOhms, 6)}, arc error ${numberText(rg.spec.arcFraction * 100)} % of full arc`;
    lines.push({ term: 'Range', text: `${which}: ${spec}` });
  }

  if (e.uncertainty) {
    const u = e.uncertainty;
    const limit =
      u.aOhms === null
        ? `The meter’s limit is unbounded above here (the needle near ∞): no finite U.`
        : `The meter’s limit a = ±${ohmsText(u.aOhms, 4)} (from ${ohmsText(u.limitLowOhms, 5)} to ${u.limitHighOhms === null ? '∞' : ohmsText(u.limitHighOhms, 5)}), taken as rectangular: u = a/√3 = ${ohmsText(u.uMeterOhms ?? 0, 3)}.`;
    lines.push({ term: 'Meter limit', text: limit, detail: u.reference });
    if (u.UOhms !== null && u.ucOhms !== null) {
      lines.push({
        term: 'Uncertainty U',
        text: `±${ohmsText(u.UOhms, 3)} = k·u_c with coverage factor k = ${u.k}, u_c = ${ohmsText(u.ucOhms, 3)}`,
        detail: `u_c combines the meter’s u with the residual lead-and-contact term u = ${ohmsText(u.uContactOhms, 2)}. A coverage factor of 2 on a rectangular limit is not a stated confidence level.`,
      });
    }
  } else {
    lines.push({ term: 'Uncertainty U', text: 'not known (no meter profile, or a state reading)' });
  }

  const rule = e.rule;
  lines.push({
    term: 'Decision rule',
    text: rule.applied === rule.decision ? DECISION_LABELS[rule.applied] : `${DECISION_LABELS[rule.applied]}, as ${rule.decision} needs a meter profile`,
    detail: rule.reference,
  });

  if (e.guard) {
    const g = e.guard;
    lines.push(
      g.acceptanceZoneEmpty
        ? { term: 'Guard band', text: 'U at the band’s limits is as wide as the band: this meter and range cannot decide this band.' }
        : {
            term: 'Guard band',
            text:
              `Accepted from ${g.acceptanceLowOhms === null ? '—' : ohmsText(g.acceptanceLowOhms)} to ${g.acceptanceHighOhms === null ? 'no upper limit' : ohmsText(g.acceptanceHighOhms)}; ` +
              `rejected below ${g.rejectionLowOhms === null ? '—' : ohmsText(g.rejectionLowOhms)}${g.rejectionHighOhms === null ? '' : ` or above ${ohmsText(g.rejectionHighOhms)}`}; inconclusive between.`,
            detail: `U at the lower limit ${g.UAtLowOhms === null ? 'unbounded' : ohmsText(g.UAtLowOhms, 3)}, at the upper limit ${g.UAtHighOhms === null ? 'unbounded' : ohmsText(g.UAtHighOhms, 3)}, each on the range that would display that limit.`,
          },
    );
  }

  if (e.nearLimit) {
    const n = e.nearLimit;
    lines.push({
      term: 'Near limit',
      text: `Beyond ${numberText(n.fraction * 100, 1)} % of each side: below ${ohmsText(n.lowOhms)} (${pctText(n.lowPct, 1)}) or above ${ohmsText(n.highOhms)} (${pctText(n.highPct, 1)})`,
    });
  }

  if (e.conformity) {
    lines.push({
      term: 'p_c',
      text: `Probability of conformity ${numberText(e.conformity.probability, 4)} — normal approximation, with u = ${ohmsText(e.conformity.uOhms, 3)} at the reading`,
      detail: e.conformity.method,
    });
  }

  if (typeof e.expected !== 'number') {
    lines.push({
      term: 'Thresholds',
      text: `Short at or below ${ohmsText(e.thresholds.shortDisplayedOhms, 3)} as displayed (${ohmsText(e.thresholds.shortOhms, 3)} plus the leads); open at or above ${ohmsText(e.thresholds.openOhms)}`,
    });
  }
  if (e.methodCaveat) lines.push({ term: 'Method', text: e.methodCaveat });
  return lines;
}
