/**
 * The listening page's script, for the browser (type-checked against the DOM by tsconfig.page.json,
 * bundled into one function by the build and written inline into each page: compare/pageScript.ts).
 * It wires every take section of the page:
 * - all players of a take play together, muted but the selected one, so switching is instant and
 *   keeps the playback position; a timer pulls drifting players back in line;
 * - keys: 0 dry, 1-9 variants, space play/pause, arrows seek/step, t next take;
 * - a blind ABX session per take: the chosen pair is assigned to A and B at random (hidden),
 *   X is A or B at random each trial, the score and the binomial p-value are shown at the end
 *   together with the labels. Randomness comes from crypto.getRandomValues, or from a seeded
 *   generator when the page address ends in #seed=N (for repeatable tests).
 */
import { binomialTailProbability } from '../compare/binomial.js';
import { mulberry32 } from '../dsp/random.js';

const DRIFT_SECONDS = 0.025;
const SEEK_STEP_SECONDS = 2;
const MAX_TRIALS = 100;

type Listening = 'a' | 'b' | 'x';

interface BlindAnswer {
  x: 'A' | 'B';
  answer: 'A' | 'B';
  correct: boolean;
}

interface BlindSession {
  a: string;
  b: string;
  x: string;
  trials: number;
  answers: BlindAnswer[];
  listening: Listening | null;
}

interface BlindResult {
  correct: number;
  trials: number;
  p: number;
  a: string;
  b: string;
}

function pageRandomBit(): () => boolean {
  const seedMatch = /[#&]seed=(\d+)/.exec(location.hash);
  if (seedMatch) {
    const next = mulberry32(Number(seedMatch[1]));
    return () => next() < 0.5;
  }
  return () => {
    const bytes = new Uint8Array(1);
    crypto.getRandomValues(bytes);
    return (bytes[0] & 1) === 1;
  };
}

const randomBit = pageRandomBit();

function formatSeconds(seconds: number): string {
  return `${(Number.isFinite(seconds) ? seconds : 0).toFixed(2)} s`;
}

/** The element matching `selector` inside `root`; the page is generated with every one present. */
function find<E extends Element = HTMLElement>(root: ParentNode, selector: string): E {
  const element = root.querySelector<E>(selector);
  if (element === null) throw new Error(`listening page: no ${selector}`);
  return element;
}

/** One take's section: its players, the blind session, and the controls that drive them. */
class TakePlayer {
  readonly audios: HTMLAudioElement[];
  private readonly byKey = new Map<string, HTMLAudioElement>();
  active: string | null;
  playing = false;
  blind: BlindSession | null = null;
  lastBlindResult: BlindResult | null = null;

  constructor(
    readonly section: HTMLElement,
    private readonly page: ListeningPage,
  ) {
    this.audios = Array.from(section.querySelectorAll<HTMLAudioElement>('audio[data-key]'));
    for (const audio of this.audios) {
      this.byKey.set(audio.dataset.key ?? '', audio);
      audio.muted = true;
      audio.loop = true;
    }
    this.active = this.audios.length > 0 ? (this.audios[0].dataset.key ?? null) : null;
    this.wire();
    this.showState();
  }

  /** The player of the selected key. */
  activeAudio(): HTMLAudioElement | undefined {
    return this.active === null ? undefined : this.byKey.get(this.active);
  }

  private q<E extends Element = HTMLElement>(selector: string): E {
    return find<E>(this.section, selector);
  }

  private showState(): void {
    for (const button of this.section.querySelectorAll<HTMLButtonElement>('button.choice')) {
      button.classList.toggle('active', button.dataset.key === this.active);
    }
    const audio = this.activeAudio();
    this.q('[data-role=now-label]').textContent = this.blind ? '(hidden)' : (audio?.dataset.label ?? '');
    this.q('[data-action=play]').textContent = this.playing ? 'Pause' : 'Play';
    this.section.classList.toggle('playing', this.playing);
  }

  private showPosition(): void {
    const audio = this.activeAudio();
    if (!audio) return;
    const seek = this.q<HTMLInputElement>('[data-role=seek]');
    if (Number.isFinite(audio.duration) && audio.duration > 0) seek.max = String(audio.duration);
    seek.value = String(audio.currentTime);
    this.q('[data-role=time]').textContent = `${formatSeconds(audio.currentTime)} / ${formatSeconds(audio.duration)}`;
  }

  private alignTo(seconds: number, except: HTMLAudioElement): void {
    for (const audio of this.audios) {
      if (audio !== except && Math.abs(audio.currentTime - seconds) > DRIFT_SECONDS) audio.currentTime = seconds;
    }
  }

  /** Keep the muted players within DRIFT_SECONDS of the audible one. */
  pullDriftingPlayers(): void {
    const audible = this.activeAudio();
    if (!this.playing || !audible) return;
    for (const audio of this.audios) {
      if (audio !== audible && !audio.seeking && Math.abs(audio.currentTime - audible.currentTime) > DRIFT_SECONDS) audio.currentTime = audible.currentTime;
    }
  }

  play(): void {
    const audible = this.activeAudio();
    if (!audible) return;
    this.page.pauseAllBut(this);
    this.alignTo(audible.currentTime, audible);
    for (const audio of this.audios) {
      audio.muted = audio !== audible;
      // A refused play() (no user gesture yet) is not an error the page can act on.
      audio.play().catch(() => undefined);
    }
    this.playing = true;
    this.showState();
  }

  pause(): void {
    for (const audio of this.audios) audio.pause();
    this.playing = false;
    const audible = this.activeAudio();
    if (audible) this.alignTo(audible.currentTime, audible);
    this.showState();
  }

  toggle(): void {
    if (this.playing) this.pause();
    else this.play();
  }

  select(key: string): boolean {
    const next = this.byKey.get(String(key));
    const previous = this.activeAudio();
    if (!next || !previous) return false;
    if (next !== previous) {
      if (Math.abs(next.currentTime - previous.currentTime) > DRIFT_SECONDS) next.currentTime = previous.currentTime;
      if (this.playing) {
        next.muted = false;
        previous.muted = true;
      }
      this.active = String(key);
    }
    this.showState();
    this.showPosition();
    return true;
  }

  seekTo(seconds: number): void {
    const audible = this.activeAudio();
    if (!audible) return;
    const limit = Number.isFinite(audible.duration) ? audible.duration : seconds;
    const t = Math.min(Math.max(0, seconds), limit);
    for (const audio of this.audios) audio.currentTime = t;
    this.showPosition();
  }

  step(direction: number): void {
    if (this.blind) return;
    const keys = this.audios.map((audio) => audio.dataset.key ?? '');
    const i = this.active === null ? 0 : keys.indexOf(this.active);
    this.select(keys[(i + direction + keys.length) % keys.length]);
  }

  // Blind (ABX) session.
  private blindText(role: string, text: string): void {
    this.q(`[data-role=${role}]`).textContent = text;
  }

  private labelOf(key: string): string {
    return this.byKey.get(key)?.dataset.label ?? '?';
  }

  private showTrial(session: BlindSession): void {
    const listening = session.listening ? ` - listening to ${session.listening.toUpperCase()}` : '';
    this.blindText('blind-status', `Trial ${session.answers.length + 1} of ${session.trials}${listening}`);
    for (const button of this.section.querySelectorAll<HTMLButtonElement>('[data-listen]')) {
      button.classList.toggle('active', button.dataset.listen === session.listening);
    }
  }

  listen(which: Listening): void {
    const session = this.blind;
    if (!session) return;
    session.listening = which;
    this.select(which === 'a' ? session.a : which === 'b' ? session.b : session.x);
    this.showTrial(session);
  }

  startBlind(): boolean {
    const first = this.q<HTMLSelectElement>('[data-role=pick-1]').value;
    const second = this.q<HTMLSelectElement>('[data-role=pick-2]').value;
    if (first === second) {
      this.blindText('blind-message', 'Choose two different players.');
      return false;
    }
    const trials = Math.round(Number(this.q<HTMLInputElement>('[data-role=trials]').value));
    if (!(trials >= 1 && trials <= MAX_TRIALS)) {
      this.blindText('blind-message', `Trials: a whole number from 1 to ${MAX_TRIALS}.`);
      return false;
    }
    this.blindText('blind-message', '');
    const swap = randomBit();
    const a = swap ? second : first;
    const b = swap ? first : second;
    this.blind = { a, b, x: randomBit() ? a : b, trials, answers: [], listening: null };
    this.section.classList.add('blind-on');
    this.q('[data-role=blind-setup]').hidden = true;
    this.q('[data-role=blind-run]').hidden = false;
    this.q('[data-role=blind-result]').hidden = true;
    this.listen('a');
    return true;
  }

  answer(choice: 'a' | 'b'): void {
    const session = this.blind;
    if (!session) return;
    const guessedKey = choice === 'a' ? session.a : session.b;
    session.answers.push({ x: session.x === session.a ? 'A' : 'B', answer: choice === 'a' ? 'A' : 'B', correct: guessedKey === session.x });
    if (session.answers.length >= session.trials) {
      this.finishBlind();
      return;
    }
    session.x = randomBit() ? session.a : session.b;
    if (session.listening === 'x') this.select(session.x);
    this.showTrial(session);
  }

  finishBlind(): void {
    const session = this.blind;
    if (!session) return;
    const n = session.answers.length;
    const k = session.answers.filter((r) => r.correct).length;
    const p = binomialTailProbability(k, n);
    const result = this.q('[data-role=blind-result]');
    result.dataset.correct = String(k);
    result.dataset.trials = String(n);
    result.dataset.p = String(p);
    find(result, '[data-role=score]').textContent = `${k} of ${n} correct`;
    find(result, '[data-role=p-value]').textContent =
      n === 0
        ? 'no trials answered'
        : `p = ${p.toPrecision(3)}: the chance of ${k} or more correct out of ${n} by guessing (binomial, 1/2 per trial). ` +
          (p < 0.05 ? 'Unlikely to be guessing: you probably hear a difference.' : 'Could well be guessing.');
    find(result, '[data-role=reveal-a]').textContent = this.labelOf(session.a);
    find(result, '[data-role=reveal-b]').textContent = this.labelOf(session.b);
    const list = find(result, '[data-role=trials-list]');
    list.textContent = '';
    session.answers.forEach((r, i) => {
      const item = document.createElement('li');
      item.textContent = `Trial ${i + 1}: X was ${r.x}, you said ${r.answer}${r.correct ? ' (right)' : ' (wrong)'}`;
      list.appendChild(item);
    });
    this.lastBlindResult = { correct: k, trials: n, p, a: this.labelOf(session.a), b: this.labelOf(session.b) };
    this.blind = null;
    this.section.classList.remove('blind-on');
    this.q('[data-role=blind-setup]').hidden = false;
    this.q('[data-role=blind-run]').hidden = true;
    result.hidden = false;
    this.showState();
  }

  private wire(): void {
    this.section.addEventListener('click', (event) => {
      const target = event.target instanceof Element ? event.target.closest('button') : null;
      this.page.current = this;
      if (!target) return;
      if (target.classList.contains('choice')) {
        if (!this.blind && target.dataset.key !== undefined) this.select(target.dataset.key);
        return;
      }
      const action = target.dataset.action;
      const listen = target.dataset.listen;
      const answer = target.dataset.answer;
      if (action === 'play') this.toggle();
      else if (action === 'blind-start') this.startBlind();
      else if (action === 'blind-stop') this.finishBlind();
      else if (listen === 'a' || listen === 'b' || listen === 'x') this.listen(listen);
      else if (answer === 'a' || answer === 'b') this.answer(answer);
    });
    this.section.addEventListener('focusin', () => {
      this.page.current = this;
    });
    this.q<HTMLInputElement>('[data-role=seek]').addEventListener('input', (event) => {
      if (event.target instanceof HTMLInputElement) this.seekTo(Number(event.target.value));
    });
    for (const audio of this.audios) {
      const follow = (): void => {
        if (audio === this.activeAudio()) this.showPosition();
      };
      audio.addEventListener('timeupdate', follow);
      audio.addEventListener('loadedmetadata', follow);
    }
  }
}

/** Every take section of the page, the one the keys act on, and the drift timer. */
class ListeningPage {
  readonly takes: TakePlayer[];
  current: TakePlayer | null;

  constructor() {
    this.takes = Array.from(document.querySelectorAll<HTMLElement>('section.take'), (section) => new TakePlayer(section, this));
    this.current = this.takes[0] ?? null;
    document.addEventListener('keydown', (event) => this.onKey(event));
    setInterval(() => {
      for (const take of this.takes) take.pullDriftingPlayers();
    }, 250);
  }

  pauseAllBut(keep: TakePlayer): void {
    for (const take of this.takes) if (take !== keep && take.playing) take.pause();
  }

  private onKey(event: KeyboardEvent): void {
    const take = this.current;
    if (!take || event.ctrlKey || event.metaKey || event.altKey) return;
    const tag = event.target instanceof Element ? event.target.tagName : '';
    if (tag === 'INPUT' || tag === 'SELECT' || tag === 'TEXTAREA') return;
    const key = event.key;
    let handled = true;
    if (key === ' ') take.toggle();
    else if (take.blind && (key === 'a' || key === 'b' || key === 'x')) take.listen(key);
    else if (take.blind && key === '1') take.answer('a');
    else if (take.blind && key === '2') take.answer('b');
    else if (!take.blind && /^[0-9]$/.test(key)) take.select(key);
    else if (key === 'ArrowLeft' || key === 'ArrowRight') {
      const audible = take.activeAudio();
      if (audible) take.seekTo(audible.currentTime + (key === 'ArrowLeft' ? -SEEK_STEP_SECONDS : SEEK_STEP_SECONDS));
    } else if (key === 'ArrowUp') take.step(-1);
    else if (key === 'ArrowDown') take.step(1);
    else if (key === 't' && this.takes.length > 1) {
      this.current = this.takes[(this.takes.indexOf(take) + 1) % this.takes.length];
      this.current.section.scrollIntoView();
    } else handled = false;
    if (handled) event.preventDefault();
  }
}

declare global {
  interface Window {
    /** The page's state, for tests and the curious: its takes and the p-value function. */
    clipbenchPage: { takes: TakePlayer[]; binomialTailProbability: typeof binomialTailProbability };
  }
}

const page = new ListeningPage();
window.clipbenchPage = { takes: page.takes, binomialTailProbability };
