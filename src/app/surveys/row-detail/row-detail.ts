import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, input, output, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatIconModule } from '@angular/material/icon';
import { VERDICT_LABELS, type Verdict } from '@domain/words';
import { SocketView } from '../../shared/socket-view/socket-view';
import { VerdictBadge } from '../../shared/verdict-badge/verdict-badge';
import { SurveySession, type RowState } from '../survey-session';
import { formatOhms } from '@domain/notation';
import { ADVICE_WORDS, METHOD_WORDS, STATE_WORDS, bandText, driftText, ohmsOrDash } from '../survey-words';

const REASON_WORDS: Readonly<Record<string, string>> = {
  'guard-band': 'inside the guard band: the meter cannot tell',
  'meter-cannot-decide': 'the meter cannot decide this band',
  climbing: 'climbing (a capacitor charging from the meter)',
  unstable: 'unstable reading',
  'unexplained-in-circuit': 'not explained in circuit',
  'over-range': 'over range on this range',
  'no-access': 'no access',
};

/**
 * The focused row in full: the socket's bottom view with its pins marked by verdict, the
 * in-circuit expectation and the part's implied value with its interval, the verdict's band and
 * U, what to do next (lift a lead, check the joints), the previous survey's value once this one is
 * keyed, a conflict with both values, and amendments on a complete survey. Never a dialog:
 * keying goes on in the grid.
 */
@Component({
  selector: 'dm-row-detail',
  imports: [DatePipe, MatButtonModule, MatCheckboxModule, MatIconModule, SocketView, VerdictBadge],
  templateUrl: './row-detail.html',
  styleUrl: './row-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RowDetail {
  protected readonly session = inject(SurveySession);

  readonly state = input.required<RowState>();
  readonly choosingEnd = input(false);
  readonly editable = input.required<boolean>();
  /** The survey is complete: changes are amendments with a reason. */
  readonly amendable = input(false);

  readonly endChosen = output<0 | 1>();
  readonly liftAsked = output<void>();
  readonly liftCancelled = output<void>();
  readonly correctAsked = output<void>();

  protected readonly adviceWords = ADVICE_WORDS;
  protected readonly methodWords = METHOD_WORDS;
  protected readonly ohms = ohmsOrDash;
  protected readonly bandText = bandText;
  /** A class survey that shows verdicts only after submission. */
  protected readonly hidden = this.session.verdictsHidden;
  protected readonly drift = computed(() => driftText(this.state().evaluation?.driftPct ?? null));

  protected readonly title = computed(() => {
    const r = this.state().row;
    // Predict first: the part's value is the expectation, hidden until the prediction is typed.
    if (r.component && this.state().predicting) return r.component.ref;
    return r.component ? `${r.component.ref} (${r.component.nominalText})` : r.pair ? 'Pair relation' : `${r.from} to ${r.to}`;
  });
  protected readonly nodes = computed(() => {
    const c = this.state().row.component;
    return c ? this.session.nodesOf(c.key) : null;
  });
  protected readonly tube = computed(() => {
    const s = this.state().row.socket;
    return s ? this.session.tubeOf(s.designator) : null;
  });
  protected readonly marks = computed<Readonly<Record<number, Verdict>>>(() => {
    const s = this.state().row.socket;
    if (this.hidden()) return {};
    return (s && this.session.socketMarks().get(s.designator)) || {};
  });
  protected readonly reasonText = computed(() => {
    const r = this.state().evaluation?.reason;
    return r ? (REASON_WORDS[r] ?? r) : '';
  });
  protected readonly band = computed(() => this.state().evaluation?.result?.band ?? null);
  protected readonly canLift = computed(() => this.editable() && this.state().row.component !== null && this.nodes() !== null);
  protected readonly offersLift = computed(() => !this.hidden() && this.state().evaluation?.advice.includes('lift-a-lead') === true);
  protected readonly showJoints = computed(
    () => this.state().row.component !== null && (this.state().jointChecked || (!this.hidden() && this.state().evaluation?.advice.includes('path-high') === true)),
  );
  protected readonly previousText = computed(() => {
    const p = this.state().previous;
    return p === null ? '' : p.state === 'value' ? p.text : STATE_WORDS[p.state];
  });
  protected readonly serverWord = computed(() => VERDICT_LABELS[this.state().serverVerdict ?? 'not-read']);

  /** The meter's ranges, for the next reading's range (none without a meter profile). */
  protected readonly ranges = computed(() => {
    const m = this.session.view()?.survey.meter?.profile;
    if (!m) return [];
    return m.kind === 'digital'
      ? m.ranges.map((r, i) => ({ index: i, label: `${i + 1}: ${formatOhms(r.fullScaleOhms)} full scale` }))
      : m.ranges.map((r, i) => ({ index: i, label: `${i + 1}: centre ${formatOhms(r.centreOhms)}` }));
  });
  protected readonly options = computed(() => this.session.nextOptions().get(this.state().row.testPointKey) ?? { rangeIndex: null, note: '' });

  protected setRange(value: string): void {
    this.session.setNextOptions(this.state().row.testPointKey, { ...this.options(), rangeIndex: value === '' ? null : Number(value) });
  }

  protected setNote(value: string): void {
    this.session.setNextOptions(this.state().row.testPointKey, { ...this.options(), note: value });
  }

  protected readonly amendText = signal('');
  protected readonly amendReason = signal('');
  protected readonly amendMessage = signal('');
  protected readonly conflictMessage = signal('');
  protected readonly busy = signal(false);

  protected conflictText(c: { text: string; state: string }): string {
    return c.state === 'value' ? c.text : c.text || STATE_WORDS[c.state as keyof typeof STATE_WORDS];
  }

  protected setJoints(checked: boolean): void {
    this.session.setJointChecked(this.state().row.testPointKey, checked);
  }

  protected async saveMine(): Promise<void> {
    this.busy.set(true);
    this.conflictMessage.set((await this.session.saveMine(this.state().row.testPointKey)) ?? '');
    this.busy.set(false);
  }

  protected keepStored(): void {
    this.session.keepStored(this.state().row.testPointKey);
    this.conflictMessage.set('');
  }

  protected async amend(): Promise<void> {
    const text = this.amendText().trim();
    const reason = this.amendReason().trim();
    if (!reason) {
      this.amendMessage.set('Say why: an amendment needs a reason.');
      return;
    }
    if (!text) {
      this.amendMessage.set('Type the corrected reading.');
      return;
    }
    this.busy.set(true);
    const s = this.state();
    const error = await this.session.amend({ readingId: s.record?.id ?? null, reason, change: { text, testPointKey: s.row.testPointKey } });
    this.busy.set(false);
    this.amendMessage.set(error ?? 'Amendment recorded.');
    if (error === null) {
      this.amendText.set('');
      this.amendReason.set('');
    }
  }

  protected value(event: Event): string {
    return (event.target as HTMLInputElement).value;
  }
}
