/**
 * The listening page's script (plain browser JavaScript, kept as text: the project compiles for
 * Node without DOM types). It wires every take section of the page:
 * - all players of a take play together, muted but the selected one, so switching is instant and
 *   keeps the playback position; a timer pulls drifting players back in line;
 * - keys: 0 dry, 1-9 variants, space play/pause, arrows seek/step, t next take;
 * - a blind ABX session per take: the chosen pair is assigned to A and B at random (hidden),
 *   X is A or B at random each trial, the score and the binomial p-value are shown at the end
 *   together with the labels. Randomness comes from crypto.getRandomValues, or from a seeded
 *   generator when the page address ends in #seed=N (for repeatable tests).
 */
import { binomialTailProbability } from './binomial.js';

const SCRIPT_BODY = String.raw`
'use strict';
var DRIFT_SECONDS = 0.025;
var SEEK_STEP_SECONDS = 2;

function mulberry32(seed) {
  var state = seed >>> 0;
  return function () {
    state = (state + 0x6d2b79f5) >>> 0;
    var t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

var seedMatch = /[#&]seed=(\d+)/.exec(location.hash);
var randomBit = seedMatch
  ? (function (next) { return function () { return next() < 0.5; }; })(mulberry32(Number(seedMatch[1])))
  : function () { var b = new Uint8Array(1); crypto.getRandomValues(b); return (b[0] & 1) === 1; };

function formatSeconds(s) { return (isFinite(s) ? s : 0).toFixed(2) + ' s'; }

var takes = [];
var currentTake = null;

function setupTake(section) {
  var audios = Array.prototype.slice.call(section.querySelectorAll('audio[data-key]'));
  var byKey = {};
  audios.forEach(function (a) { byKey[a.dataset.key] = a; a.muted = true; a.loop = true; });
  var q = function (selector) { return section.querySelector(selector); };
  var take = {
    section: section, audios: audios, byKey: byKey,
    active: audios.length ? audios[0].dataset.key : null,
    playing: false, blind: null, lastBlindResult: null,
  };

  function activeAudio() { return byKey[take.active]; }

  function showState() {
    Array.prototype.forEach.call(section.querySelectorAll('button.choice'), function (b) {
      b.classList.toggle('active', b.dataset.key === take.active);
    });
    var a = activeAudio();
    q('[data-role=now-label]').textContent = take.blind ? '(hidden)' : (a ? a.dataset.label : '');
    q('[data-action=play]').textContent = take.playing ? 'Pause' : 'Play';
    section.classList.toggle('playing', take.playing);
  }

  function showPosition() {
    var a = activeAudio();
    if (!a) return;
    var seek = q('[data-role=seek]');
    if (isFinite(a.duration) && a.duration > 0) seek.max = String(a.duration);
    seek.value = String(a.currentTime);
    q('[data-role=time]').textContent = formatSeconds(a.currentTime) + ' / ' + formatSeconds(a.duration);
  }

  function alignTo(seconds, except) {
    audios.forEach(function (a) {
      if (a !== except && Math.abs(a.currentTime - seconds) > DRIFT_SECONDS) a.currentTime = seconds;
    });
  }

  take.play = function () {
    var a = activeAudio();
    if (!a) return;
    takes.forEach(function (other) { if (other !== take && other.playing) other.pause(); });
    alignTo(a.currentTime, a);
    audios.forEach(function (x) {
      x.muted = x !== a;
      var started = x.play();
      if (started && started.catch) started.catch(function () {});
    });
    take.playing = true;
    showState();
  };

  take.pause = function () {
    audios.forEach(function (x) { x.pause(); });
    take.playing = false;
    var a = activeAudio();
    if (a) alignTo(a.currentTime, a);
    showState();
  };

  take.toggle = function () { if (take.playing) take.pause(); else take.play(); };

  take.select = function (key) {
    key = String(key);
    var next = byKey[key];
    var previous = activeAudio();
    if (!next) return false;
    if (next !== previous) {
      if (Math.abs(next.currentTime - previous.currentTime) > DRIFT_SECONDS) next.currentTime = previous.currentTime;
      if (take.playing) { next.muted = false; previous.muted = true; }
      take.active = key;
    }
    showState();
    showPosition();
    return true;
  };

  take.seekTo = function (seconds) {
    var a = activeAudio();
    if (!a) return;
    var limit = isFinite(a.duration) ? a.duration : seconds;
    var t = Math.min(Math.max(0, seconds), limit);
    audios.forEach(function (x) { x.currentTime = t; });
    showPosition();
  };

  take.step = function (direction) {
    if (take.blind) return;
    var keys = audios.map(function (a) { return a.dataset.key; });
    var i = keys.indexOf(take.active);
    take.select(keys[(i + direction + keys.length) % keys.length]);
  };

  // Blind (ABX) session.
  function blindText(role, text) { q('[data-role=' + role + ']').textContent = text; }

  function labelOf(key) { return byKey[key] ? byKey[key].dataset.label : '?'; }

  function showTrial() {
    var b = take.blind;
    blindText('blind-status', 'Trial ' + (b.answers.length + 1) + ' of ' + b.trials + (b.listening ? ' - listening to ' + b.listening.toUpperCase() : ''));
    Array.prototype.forEach.call(section.querySelectorAll('[data-listen]'), function (button) {
      button.classList.toggle('active', button.dataset.listen === b.listening);
    });
  }

  take.listen = function (which) {
    var b = take.blind;
    if (!b) return;
    b.listening = which;
    take.select(which === 'a' ? b.a : which === 'b' ? b.b : b.x);
    showTrial();
  };

  take.startBlind = function () {
    var first = q('[data-role=pick-1]').value;
    var second = q('[data-role=pick-2]').value;
    if (first === second) { blindText('blind-message', 'Choose two different players.'); return false; }
    var trials = Math.round(Number(q('[data-role=trials]').value));
    if (!(trials >= 1 && trials <= 100)) { blindText('blind-message', 'Trials: a whole number from 1 to 100.'); return false; }
    blindText('blind-message', '');
    var swap = randomBit();
    var a = swap ? second : first;
    var b = swap ? first : second;
    take.blind = { a: a, b: b, x: randomBit() ? a : b, trials: trials, answers: [], listening: null };
    section.classList.add('blind-on');
    q('[data-role=blind-setup]').hidden = true;
    q('[data-role=blind-run]').hidden = false;
    q('[data-role=blind-result]').hidden = true;
    take.listen('a');
    return true;
  };

  take.answer = function (choice) {
    var b = take.blind;
    if (!b) return;
    var guessedKey = choice === 'a' ? b.a : b.b;
    b.answers.push({ x: b.x === b.a ? 'A' : 'B', answer: choice.toUpperCase(), correct: guessedKey === b.x });
    if (b.answers.length >= b.trials) { take.finishBlind(); return; }
    b.x = randomBit() ? b.a : b.b;
    if (b.listening === 'x') take.select(b.x);
    showTrial();
  };

  take.finishBlind = function () {
    var b = take.blind;
    if (!b) return;
    var n = b.answers.length;
    var k = b.answers.filter(function (r) { return r.correct; }).length;
    var p = binomialTailProbability(k, n);
    var result = q('[data-role=blind-result]');
    result.dataset.correct = String(k);
    result.dataset.trials = String(n);
    result.dataset.p = String(p);
    result.querySelector('[data-role=score]').textContent = k + ' of ' + n + ' correct';
    result.querySelector('[data-role=p-value]').textContent = n === 0 ? 'no trials answered'
      : 'p = ' + p.toPrecision(3) + ': the chance of ' + k + ' or more correct out of ' + n + ' by guessing (binomial, 1/2 per trial). '
        + (p < 0.05 ? 'Unlikely to be guessing: you probably hear a difference.' : 'Could well be guessing.');
    result.querySelector('[data-role=reveal-a]').textContent = labelOf(b.a);
    result.querySelector('[data-role=reveal-b]').textContent = labelOf(b.b);
    var list = result.querySelector('[data-role=trials-list]');
    list.textContent = '';
    b.answers.forEach(function (r, i) {
      var item = document.createElement('li');
      item.textContent = 'Trial ' + (i + 1) + ': X was ' + r.x + ', you said ' + r.answer + (r.correct ? ' (right)' : ' (wrong)');
      list.appendChild(item);
    });
    take.lastBlindResult = { correct: k, trials: n, p: p, a: labelOf(b.a), b: labelOf(b.b) };
    take.blind = null;
    section.classList.remove('blind-on');
    q('[data-role=blind-setup]').hidden = false;
    q('[data-role=blind-run]').hidden = true;
    result.hidden = false;
    showState();
  };

  section.addEventListener('click', function (event) {
    var target = event.target.closest('button');
    currentTake = take;
    if (!target) return;
    if (target.classList.contains('choice')) { if (!take.blind) take.select(target.dataset.key); return; }
    var action = target.dataset.action;
    if (action === 'play') take.toggle();
    else if (action === 'blind-start') take.startBlind();
    else if (action === 'blind-stop') take.finishBlind();
    else if (target.dataset.listen) take.listen(target.dataset.listen);
    else if (target.dataset.answer) take.answer(target.dataset.answer);
  });
  section.addEventListener('focusin', function () { currentTake = take; });
  q('[data-role=seek]').addEventListener('input', function (event) { take.seekTo(Number(event.target.value)); });
  audios.forEach(function (a) {
    a.addEventListener('timeupdate', function () { if (a === activeAudio()) showPosition(); });
    a.addEventListener('loadedmetadata', function () { if (a === activeAudio()) showPosition(); });
  });
  showState();
  return take;
}

document.addEventListener('keydown', function (event) {
  var take = currentTake;
  if (!take || event.ctrlKey || event.metaKey || event.altKey) return;
  var tag = event.target && event.target.tagName;
  if (tag === 'INPUT' || tag === 'SELECT' || tag === 'TEXTAREA') return;
  var key = event.key;
  var handled = true;
  if (key === ' ') take.toggle();
  else if (take.blind && (key === 'a' || key === 'b' || key === 'x')) take.listen(key);
  else if (take.blind && key === '1') take.answer('a');
  else if (take.blind && key === '2') take.answer('b');
  else if (!take.blind && /^[0-9]$/.test(key)) take.select(key);
  else if (key === 'ArrowLeft' || key === 'ArrowRight') {
    var a = take.audios.filter(function (x) { return x.dataset.key === take.active; })[0];
    if (a) take.seekTo(a.currentTime + (key === 'ArrowLeft' ? -SEEK_STEP_SECONDS : SEEK_STEP_SECONDS));
  } else if (key === 'ArrowUp') take.step(-1);
  else if (key === 'ArrowDown') take.step(1);
  else if (key === 't' && takes.length > 1) {
    currentTake = takes[(takes.indexOf(take) + 1) % takes.length];
    currentTake.section.scrollIntoView();
  } else handled = false;
  if (handled) event.preventDefault();
});

takes = Array.prototype.slice.call(document.querySelectorAll('section.take')).map(setupTake);
currentTake = takes[0] || null;
setInterval(function () {
  takes.forEach(function (take) {
    if (!take.playing) return;
    var a = take.audios.filter(function (x) { return x.dataset.key === take.active; })[0];
    if (!a) return;
    take.audios.forEach(function (x) {
      if (x !== a && !x.seeking && Math.abs(x.currentTime - a.currentTime) > DRIFT_SECONDS) x.currentTime = a.currentTime;
    });
  });
}, 250);
window.clipbenchPage = { takes: takes, binomialTailProbability: binomialTailProbability };
`;

/** The complete script: the shared p-value function, then the page logic, in one closure. */
export function listeningPageScript(): string {
  return `(function () {\nvar binomialTailProbability = ${binomialTailProbability.toString()};\n${SCRIPT_BODY}})();\n`;
}
