/**
 * The listening page `index.html`: self-contained (inline CSS, inline script, inline SVG spectra),
 * opens from the file system with no network; the audio is the WAVs beside it, by relative name.
 * All user text (labels, overrides, file and design names) is escaped; a Content-Security-Policy
 * allows only this page's own script (by hash) and media from the page's folder.
 */
import { createHash } from 'node:crypto';
import type { SpectrumPoint } from '../analysis/analyzeTake.js';
import { escapeHtml } from '../report/html.js';
import { renderLinePlotSvg, FREQUENCY_AXIS, SPECTRUM_LEVEL_AXIS } from '../report/plots.js';
import { formatValue } from '../report/table.js';
import { listeningPageScript } from './pageScript.js';
import type { CompareEntry, CompareSummary, CompareTake } from './summary.js';

/** Keys 0-9 select players; later variants are reached by click or the arrow keys. */
const KEYED_PLAYERS = 10;
/** The spectrum plot shows this many dB under its highest point. */
const SPECTRUM_RANGE_DB = 100;

const STYLE = `
body { font-family: Helvetica, Arial, sans-serif; margin: 1.5em auto; max-width: 68em; padding: 0 1em; color: #222; background: #fff; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; }
h2 { font-size: 1.2em; border-bottom: 1px solid #ccc; padding-bottom: 0.2em; margin-top: 2em; }
h3 { font-size: 1.05em; }
.caution { background: #fff4e0; border-left: 4px solid #e0a030; padding: 0.5em 0.8em; }
.notes li { color: #8a4b00; }
.failed { color: #a00; }
.transport { display: flex; gap: 0.8em; align-items: center; margin: 0.6em 0; }
.transport input[type=range] { flex: 1; }
.choices { display: flex; flex-wrap: wrap; gap: 0.4em; }
button { font: inherit; padding: 0.3em 0.7em; border: 1px solid #888; border-radius: 4px; background: #f6f6f6; cursor: pointer; }
button.active { background: #1f5fa8; color: #fff; border-color: #1f5fa8; }
kbd { font-family: monospace; border: 1px solid #aaa; border-radius: 3px; padding: 0 0.25em; margin-right: 0.3em; background: #fff; color: #222; }
.blind-on .choices, .blind-on .now { visibility: hidden; }
.blind { border: 1px solid #ccc; border-radius: 6px; padding: 0.2em 1em 0.8em; margin-top: 1em; }
table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.92em; }
th, td { padding: 0.25em 0.6em; border-bottom: 1px solid #e3e3e3; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
th { background: #f4f4f4; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
.keys { color: #555; font-size: 0.9em; }
`;

function playerName(entry: CompareEntry): string {
  return entry.kind === 'dry' ? 'dry take' : `${entry.variant}. ${entry.label}`;
}

function keyBadge(entry: CompareEntry): string {
  return entry.variant < KEYED_PLAYERS ? `<kbd>${entry.variant}</kbd>` : '';
}

function metricsTable(take: CompareTake): string {
  const head = ['player', 'overrides', 'loudness before, LUFS', 'gain, dB', 'loudness, LUFS', 'peak, dBFS', 'crest, dB', 'THD at 1 kHz 0.5 V, %', 'THD at 1 kHz, take peak, %', 'centroid, Hz', 'note'];
  const rows = take.entries.map((entry) => {
    const note =
      entry.error !== undefined
        ? `failed: ${entry.error}`
        : entry.ceilingLimited
          ? 'held by the peak ceiling: quieter than the target'
          : entry.levelledToQuietest
            ? 'turned down to match the quietest player'
            : '';
    const cells = [
      formatValue(entry.loudnessBeforeLufs, 1),
      entry.file === null ? '' : formatValue(entry.gainDb, 1),
      formatValue(entry.loudnessLufs, 1),
      formatValue(entry.peakDbfs, 1),
      formatValue(entry.crestDb, 1),
      formatValue(entry.thdPercent, 2),
      formatValue(entry.thdAtTakePeakPercent, 2),
      formatValue(entry.centroidHz, 0),
    ];
    return `<tr${entry.error !== undefined ? ' class="failed"' : ''}><td>${escapeHtml(playerName(entry))}</td><td>${escapeHtml(entry.overrides.join(' '))}</td>${cells
      .map((cell) => `<td class="num">${escapeHtml(cell)}</td>`)
      .join('')}<td>${escapeHtml(note)}</td></tr>`;
  });
  return `<table class="metrics">\n<thead><tr>${head.map((h) => `<th>${escapeHtml(h)}</th>`).join('')}</tr></thead>\n<tbody>\n${rows.join('\n')}\n</tbody>\n</table>`;
}

async function spectrumFigure(take: CompareTake, spectra: ReadonlyMap<string, readonly SpectrumPoint[]>): Promise<string> {
  const series = take.entries.flatMap((entry) => {
    const points = entry.file === null ? undefined : spectra.get(entry.file);
    return points && points.length > 0 ? [{ name: playerName(entry), points: points.map((p) => ({ x: p.hz, y: p.db })) }] : [];
  });
  if (series.length === 0) return '';
  const top = Math.ceil(Math.max(...series.flatMap((s) => s.points.map((p) => p.y))) / 10) * 10;
  const svg = await renderLinePlotSvg({
    title: 'Long-term average spectra (Welch)',
    xLabel: FREQUENCY_AXIS,
    yLabel: SPECTRUM_LEVEL_AXIS,
    xScale: 'log',
    yDomain: [top - SPECTRUM_RANGE_DB, top],
    widthPx: 760,
    heightPx: 300,
    series,
  });
  return `<figure class="spectra">\n${svg}\n</figure>`;
}

function playerOptions(players: readonly CompareEntry[], selected: CompareEntry | undefined): string {
  return players
    .map((entry) => `<option value="${entry.variant}"${entry === selected ? ' selected' : ''}>${escapeHtml(playerName(entry))}</option>`)
    .join('');
}

async function takeSection(take: CompareTake, index: number, spectra: ReadonlyMap<string, readonly SpectrumPoint[]>): Promise<string> {
  const players = take.entries.filter((entry) => entry.file !== null);
  // The blind test starts on two variants (the question is usually "which value?"), the dry take
  // only when fewer than two variants rendered; with a recording of the built circuit, on the
  // recording against the last render ("does my fitted model sound like my build?").
  const variants = players.filter((entry) => entry.kind === 'variant');
  const recording = players.find((entry) => entry.kind === 'recording');
  const [abxFirst, abxSecond] =
    recording !== undefined && variants.length > 0 ? [recording, variants[variants.length - 1]] : variants.length >= 2 ? variants : [players[0], players[1] ?? players[0]];
  const audios = players
    .map((entry) => `<audio preload="auto" loop data-key="${entry.variant}" data-label="${escapeHtml(playerName(entry))}" src="${escapeHtml(encodeURIComponent(entry.file ?? ''))}"></audio>`)
    .join('\n');
  const choices = players
    .map((entry) => `<button type="button" class="choice" data-key="${entry.variant}">${keyBadge(entry)}${escapeHtml(entry.kind === 'dry' ? 'dry' : entry.label)}</button>`)
    .join('\n');
  const channels = take.channels === 1 ? 'mono' : take.channels === 2 ? 'stereo' : `${take.channels} channels`;
  return `<section class="take" data-take="${index}">
<h2>Take ${index + 1}: ${escapeHtml(take.name)}</h2>
<p class="keys">${escapeHtml(`${take.take}, ${take.seconds.toFixed(2)} s, ${take.sampleRate} Hz, ${channels}`)}</p>
<div class="players">
${audios}
</div>
<div class="transport">
<button type="button" data-action="play">Play</button>
<input type="range" data-role="seek" min="0" max="${take.seconds.toFixed(3)}" step="0.01" value="0" aria-label="playback position">
<span data-role="time">0.00 s</span>
<span class="now">now: <b data-role="now-label"></b></span>
</div>
<div class="choices" role="group" aria-label="players">
${choices}
</div>
<div class="blind">
<h3>Blind test (ABX)</h3>
<div data-role="blind-setup">
<p>Choose two players. The page hides which one is A and which is B; each trial X is A or B at random. Listen to A, B and X as often as you like, then say which one X is.</p>
<label>Pair: <select data-role="pick-1">${playerOptions(players, abxFirst)}</select></label>
<label> and <select data-role="pick-2">${playerOptions(players, abxSecond)}</select></label>
<label> trials <input type="number" data-role="trials" min="1" max="100" value="10"></label>
<button type="button" data-action="blind-start">Start blind test</button>
<span data-role="blind-message" class="failed"></span>
</div>
<div data-role="blind-run" hidden>
<p data-role="blind-status"></p>
<button type="button" data-listen="a"><kbd>a</kbd>A</button>
<button type="button" data-listen="b"><kbd>b</kbd>B</button>
<button type="button" data-listen="x"><kbd>x</kbd>X</button>
&nbsp; <button type="button" data-answer="a"><kbd>1</kbd>X is A</button>
<button type="button" data-answer="b"><kbd>2</kbd>X is B</button>
&nbsp; <button type="button" data-action="blind-stop">Stop and score</button>
</div>
<div data-role="blind-result" hidden>
<p><b>Score: <span data-role="score"></span></b></p>
<p data-role="p-value"></p>
<p>A was <b data-role="reveal-a"></b>; B was <b data-role="reveal-b"></b>.</p>
<ol data-role="trials-list"></ol>
</div>
</div>
${metricsTable(take)}
${await spectrumFigure(take, spectra)}
</section>`;
}

function headerNotes(summary: CompareSummary): string {
  const match = summary.loudnessMatch;
  const held = summary.takes.filter((take) => take.matchedLufs !== null && match !== null && take.matchedLufs < match.targetLufs - 0.05);
  const matching = match
    ? held.length === 0
      ? `Every player, the dry take too, is loudness-matched to ${match.targetLufs} LUFS (ITU-R BS.1770-4 integrated) with sample peaks held under ${match.ceilingDbfs} dBFS.`
      : `Every player of a take, the dry take too, is loudness-matched (ITU-R BS.1770-4 integrated) with sample peaks held under ${match.ceilingDbfs} dBFS: to ${match.targetLufs} LUFS where the ceiling allowed it; ${held.map((take) => `${take.name} to ${take.matchedLufs?.toFixed(1)} LUFS`).join(', ')}, its quietest player's level.`
    : 'Not loudness-matched (--no-match): each render keeps the circuit\'s own level, and louder tends to sound better.';
  const notes = [...summary.ceilingLimited, ...summary.failures];
  const list = notes.length ? `<ul class="notes">${notes.map((note) => `<li>${escapeHtml(note)}</li>`).join('')}</ul>` : '';
  return `<p>${escapeHtml(matching)}</p>\n${list}`;
}

/** Builds the page; `spectra` maps written file names to their long-term spectra. */
export async function buildListeningPage(summary: CompareSummary, spectra: ReadonlyMap<string, readonly SpectrumPoint[]>): Promise<string> {
  const script = listeningPageScript();
  const scriptHash = createHash('sha256').update(script, 'utf8').digest('base64');
  const policy = `default-src 'none'; script-src 'sha256-${scriptHash}'; style-src 'unsafe-inline'; media-src 'self' file:; img-src data:`;
  const sections: string[] = [];
  for (const [index, take] of summary.takes.entries()) sections.push(await takeSection(take, index, spectra));
  const title = `clipbench compare: ${summary.design}`;
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${escapeHtml(policy)}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
<style>${STYLE}</style>
</head>
<body>
<h1>${escapeHtml(title)}</h1>
<p class="caution">Rendered drive can be loud: start playback at a low volume.</p>
${headerNotes(summary)}
<p class="keys">Keys: <kbd>0</kbd> dry, <kbd>1</kbd>-<kbd>9</kbd> variants, <kbd>space</kbd> play/pause, <kbd>&larr;</kbd>/<kbd>&rarr;</kbd> seek 2 s, <kbd>&uarr;</kbd>/<kbd>&darr;</kbd> previous/next player, <kbd>t</kbd> next take. Blind test: <kbd>a</kbd>/<kbd>b</kbd>/<kbd>x</kbd> listen, <kbd>1</kbd> X is A, <kbd>2</kbd> X is B. Switching keeps the playback position.</p>
${sections.join('\n')}
<script>${script}</script>
</body>
</html>
`;
}
