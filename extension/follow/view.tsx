import { useEffect, useRef, useState } from 'preact/hooks';
import { reseedRange, type CaseRecord, type FollowedFrame, type FollowRun, type Mark } from '../../src/case';
import { message as t, send } from '../shared/browser';
import type { RateReply } from '../shared/frames';
import { CorrectFrame } from './correct';
import { correctionSeed, startEnds, type Pt } from './corrections';
import { FrameReadError, readFrameRate, readVideoFacts, type VideoFacts } from './page-frames';
import { followedMarks, PlanError, planFollow, timeOf, type FollowPlan } from './plan';
import { runFollow } from './runner';
import { FollowStrip } from './strip';
import './follow.css';

/*
 * The follow page (`?view=follow&tab=ID&frame=ID&case=ID&mark=ID`): from one hand-marked span, the
 * object followed through a stretch of the clip, every frame shown on a strip, lost frames listed
 * with their reason; accepted, the followed frames join the case as marks that say how they were
 * found. Opened from the popup beside a case with an object span.
 */

type Phase =
  | { kind: 'ready' }
  | { kind: 'running'; done: number; total: number }
  | { kind: 'finished'; runId: string }
  | { kind: 'added'; count: number }
  | { kind: 'stopped'; text: string };

const params = () => new URLSearchParams(location.search);

const seconds = (x: number) => x.toFixed(3);

function reasonText(err: unknown): string {
  if (err instanceof FrameReadError) return t(err.reason === 'no-session' ? 'followNoVideo' : err.reason === 'seek-timeout' ? 'followSeekTimeout' : 'followNoPixels');
  return (err as Error).message;
}

function pickedText(f: FollowedFrame): string {
  if (f.status === 'lost') return t('followPickedLost', f.reason ?? '');
  return t(f.status === 'seed' ? 'followPickedSeed' : 'followPickedFollowed');
}

export function FollowView() {
  const q = params();
  const tabId = Number(q.get('tab'));
  const frameId = Number(q.get('frame') ?? 0);
  const caseId = q.get('case') ?? '';
  const [c, setCase] = useState<CaseRecord | null>(null);
  const [facts, setFacts] = useState<VideoFacts | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [form, setForm] = useState({ from: '', to: '', fps: '30' });
  const [fieldError, setFieldError] = useState<string | null>(null);
  const [phase, setPhase] = useState<Phase>({ kind: 'ready' });
  const [frames, setFrames] = useState<(FollowedFrame | undefined)[]>([]);
  const plan = useRef<FollowPlan | null>(null);
  const stop = useRef<AbortController | null>(null);
  const lastRun = useRef<FollowRun | null>(null);
  // the frame rate the browser tells (null while it is measured), and whether the user has set the field
  const [rate, setRate] = useState<RateReply | null>(null);
  const fpsTyped = useRef(false);
  const [picked, setPicked] = useState<number | null>(null);
  const corrected = useRef(new Set<number>());
  const [note, setNote] = useState<string | null>(null);

  useEffect(() => {
    document.title = t('followTitle');
    send('case/get', { caseId }).then(setCase, (e: Error) => setProblem(e.message));
    readVideoFacts(tabId, frameId).then(
      (f) => {
        setFacts(f);
        // after the facts (the overlay is there): the rate seeks the video, so Start waits for it
        readFrameRate(tabId, frameId).then(
          (r) => {
            setRate(r);
            if (r.ok && !fpsTyped.current) setForm((x) => ({ ...x, fps: String(r.fps) }));
          },
          () => setRate({ ok: false, reason: 'not-told' }),
        );
      },
      (e) => setProblem(reasonText(e)),
    );
  }, []);
  const seed: Mark | undefined = c?.marks.find((m) => m.id === q.get('mark')) ?? c?.marks.filter((m) => m.kind === 'object-span' && !m.followed).at(-1);
  useEffect(() => {
    if (seed && facts) {
      const end = Number.isFinite(facts.duration) && facts.duration > 0 ? facts.duration : seed.t + 5;
      setForm((f) => ({ ...f, from: seconds(Math.max(0, seed.t - 5)), to: seconds(Math.min(end, seed.t + 5)) }));
    }
  }, [seed?.id, facts]);

  const start = async () => {
    if (!seed || !facts || !c) return;
    let p: FollowPlan;
    try {
      p = planFollow(seed.t, Number(form.from), Number(form.to), Number(form.fps), facts.duration);
    } catch (e) {
      if (e instanceof PlanError) return setFieldError(e.message);
      throw e;
    }
    setFieldError(null);
    plan.current = p;
    setPicked(null);
    setNote(null);
    corrected.current = new Set();
    const seen: (FollowedFrame | undefined)[] = new Array(p.count);
    setFrames(seen.slice());
    const ctrl = new AbortController();
    stop.current = ctrl;
    setPhase({ kind: 'running', done: 0, total: p.count });
    try {
      const run = await runFollow({
        tabId,
        frameId,
        plan: p,
        seed,
        video: { width: facts.width, height: facts.height },
        signal: ctrl.signal,
        onFrame: (f, done) => {
          seen[f.index] = f;
          setFrames(seen.slice());
          setPhase({ kind: 'running', done, total: p.count });
        },
      });
      setFrames(run.frames);
      setPhase({ kind: 'finished', runId: `follow-${Date.now().toString(36)}` });
      lastRun.current = run;
    } catch (e) {
      setPhase({ kind: 'stopped', text: (e as Error).name === 'AbortError' ? t('followCancelled') : t('followFailed', reasonText(e)) });
    }
  };

  /** A correction on frame `index`: the engine's reseed from it, in the worker, for the frames that depend on it. */
  const correct = async (index: number, ends: [Pt, Pt]) => {
    const run = lastRun.current;
    const p = plan.current;
    if (!run || !p || !seed || !facts || phase.kind !== 'finished') return;
    const runId = phase.runId;
    const [lo, hi] = reseedRange(run, index);
    const seen = run.frames.slice();
    const ctrl = new AbortController();
    stop.current = ctrl;
    setNote(null);
    setPhase({ kind: 'running', done: 0, total: hi - lo + 1 });
    try {
      const next = await runFollow({
        tabId,
        frameId,
        plan: p,
        seed,
        video: { width: facts.width, height: facts.height },
        signal: ctrl.signal,
        correction: { run, seed: correctionSeed(index, ends, seed.edgeSigmaPx) },
        onFrame: (f, done) => {
          seen[f.index] = f;
          setFrames(seen.slice());
          setPhase({ kind: 'running', done, total: hi - lo + 1 });
        },
      });
      lastRun.current = next;
      corrected.current.add(index);
      setFrames(next.frames);
      setNote(t('followCorrected', [seconds(timeOf(p, index)), String(hi - lo)]));
    } catch (e) {
      // the run before the correction stands, whole
      setFrames(run.frames);
      setNote((e as Error).name === 'AbortError' ? t('followCancelled') : t('followFailed', reasonText(e)));
    }
    setPhase({ kind: 'finished', runId });
  };

  const accept = async () => {
    const run = lastRun.current;
    if (!run || !seed || phase.kind !== 'finished' || !plan.current) return;
    const marks = followedMarks(run.frames, plan.current, seed, run.settings, phase.runId, Date.now(), corrected.current);
    try {
      await send('marks/put', { caseId, marks });
      setPhase({ kind: 'added', count: marks.length });
    } catch (e) {
      setPhase({ kind: 'stopped', text: t('followFailed', (e as Error).message) });
    }
  };

  if (problem) return <main class="follow"><h1>{t('followTitle')}</h1><p class="error" role="alert">{problem}</p></main>;
  if (!c || !facts) return <main class="follow"><h1>{t('followTitle')}</h1><p class="muted">…</p></main>;
  if (!seed) return <main class="follow"><h1>{t('followTitle')}</h1><p class="error" role="alert">{t('followNoMark')}</p></main>;
  const p = plan.current;
  const followedCount = frames.filter((f) => f?.status === 'followed').length;
  const lost = frames.filter((f): f is FollowedFrame => f?.status === 'lost');
  const field = (key: 'from' | 'to' | 'fps', label: string) => (
    <label>
      {label}
      <input
        type="number"
        step="any"
        value={form[key]}
        data-testid={`follow-${key}`}
        disabled={phase.kind === 'running'}
        onInput={(e) => {
          if (key === 'fps') fpsTyped.current = true;
          setForm({ ...form, [key]: (e.target as HTMLInputElement).value });
        }}
      />
    </label>
  );
  return (
    <main class="follow">
      <h1>{t('followTitle')}</h1>
      <p class="muted">{t('cautionEstimate')}</p>
      <p>{t('followIntro', seconds(seed.t))}</p>
      <form onSubmit={(e) => { e.preventDefault(); void start(); }}>
        {field('from', t('followFrom'))}
        {field('to', t('followTo'))}
        {field('fps', t('followFps'))}
        <button type="submit" data-testid="follow-start" disabled={phase.kind === 'running' || rate === null}>{t('followStart')}</button>
        {phase.kind === 'running' && <button type="button" class="secondary" data-testid="follow-cancel" onClick={() => stop.current?.abort()}>{t('followCancel')}</button>}
      </form>
      <p class="muted" data-testid="follow-fps-source">
        {rate === null ? t('followFpsMeasuring') : rate.ok ? t('followFpsMeasured', [rate.periodS.toFixed(4), String(rate.frames), String(rate.fps)]) : t('followFpsGuess')}
      </p>
      {fieldError && <p class="error" role="alert" data-testid="follow-field-error">{fieldError}</p>}
      {p && phase.kind === 'running' && (
        <p role="status">
          <progress max={phase.total} value={phase.done} /> {t('followProgress', [String(phase.done), String(phase.total)])}
        </p>
      )}
      {p && frames.length > 0 && <FollowStrip frames={frames} count={p.count} picked={picked} onPick={phase.kind === 'finished' ? setPicked : undefined} />}
      {p && frames.length > 0 && <p class="muted">{t('followStripLegend', [seconds(timeOf(p, 0)), seconds(timeOf(p, p.count - 1))])}</p>}
      {p && (phase.kind === 'finished' || phase.kind === 'added') && (
        <p data-testid="follow-counts">{t('followCounts', [String(followedCount), String(lost.length)])}</p>
      )}
      {p && lost.length > 0 && phase.kind !== 'running' && (
        <details>
          <summary>{t('followLostList')}</summary>
          <ul>{lost.map((f) => <li key={f.index}>{t('followLostAt', [seconds(timeOf(p, f.index)), f.reason ?? ''])}</li>)}</ul>
        </details>
      )}
      {p && picked !== null && phase.kind !== 'added' && frames[picked] && <p data-testid="follow-picked">{t('followPicked', [seconds(timeOf(p, picked)), String(picked + 1), String(p.count), pickedText(frames[picked]!)])}</p>}
      {p && facts && picked !== null && (phase.kind === 'finished' || phase.kind === 'running') && startEnds(frames, picked) && (
        <CorrectFrame
          key={`${picked}-${frames[picked]?.status}-${frames[picked]?.from}`}
          tabId={tabId}
          frameId={frameId}
          t={timeOf(p, picked)}
          video={{ width: facts.width, height: facts.height }}
          start={startEnds(frames, picked)!}
          busy={phase.kind === 'running'}
          onApply={(ends) => void correct(picked, ends)}
        />
      )}
      {note && <p role="status" data-testid="follow-note">{note}</p>}
      {phase.kind === 'finished' && followedCount > 0 && (
        <button type="button" class="primary" data-testid="follow-accept" onClick={() => void accept()}>{t('followAccept', String(followedCount))}</button>
      )}
      {phase.kind === 'added' && <p role="status" data-testid="follow-added">{t('followAdded', String(phase.count))}</p>}
      {phase.kind === 'stopped' && <p role="alert" class="error" data-testid="follow-stopped">{phase.text}</p>}
    </main>
  );
}
