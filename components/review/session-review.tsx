"use client";

// Listening back to one lapping session: the recording's waveform with each stroke marked, the
// fade curve beside it, and the stroke table. One stroke is "active" at a time (hovered in any of
// the three, or playing) and is highlighted in all of them, so the ear, the curve and the numbers
// can be matched up.
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type WaveSurfer from "wavesurfer.js";
import type { Region } from "wavesurfer.js/dist/plugins/regions.esm.js";
import type { FadeFit } from "@/lib/audio/fade";
import { flagText } from "@/lib/audio/verdict";
import { fadeAxes, fadeData, fadeSeries, fadeYRange, shadeSettledZone } from "@/components/bench/fade-plot";

export interface ReviewStroke {
  n: number;
  startS: number;
  endS: number;
  onsetDb: number;
  bodyDb: number;
  contrastDb: number;
  /** Band SNR, dB; absent or null for strokes from phones that did not send it. */
  bandSnrDb?: number | null;
  flags: string[];
}

type LoadState = "loading" | "ready" | "error";
type Playing = { kind: "stroke"; n: number } | { kind: "compare"; step: "first" | "last" } | null;

/** How long of each stroke's start the comparison plays: the onset is where the grit is heard. */
const COMPARE_SECONDS = 0.4;
/** A short silence between the two, so they are heard as two sounds rather than one. */
const COMPARE_GAP_MS = 250;
/** Contrast at or above which a stroke is drawn fully "rough". A display choice, not a rule. */
const ROUGH_DB = 8;

const INK = "#1c1917";
const BRASS = "#b45309";

/** Settled-green for strokes at the threshold, shading to brass as the contrast rises. */
function contrastColour(db: number, thresholdDb: number, alpha: number): string {
  const t = Math.min(1, Math.max(0, (db - thresholdDb) / (ROUGH_DB - thresholdDb)));
  const mix = (a: number, b: number) => Math.round(a + (b - a) * t);
  return `rgba(${mix(16, 180)}, ${mix(185, 83)}, ${mix(129, 9)}, ${alpha})`;
}



export function SessionReview({
  sessionId,
  hasRecording,
  strokes,
  fit,
  thresholdDb,
}: {
  sessionId: string;
  hasRecording: boolean;
  strokes: ReviewStroke[];
  fit: FadeFit | null;
  thresholdDb: number;
}) {
  const [active, setActive] = useState<number | null>(null);
  const [playing, setPlaying] = useState<Playing>(null);
  const [load, setLoad] = useState<LoadState>(hasRecording ? "loading" : "ready");
  const [message, setMessage] = useState<string | null>(null);
  const [regionCount, setRegionCount] = useState(0);

  const waveBox = useRef<HTMLDivElement>(null);
  const ws = useRef<WaveSurfer | null>(null);
  const regions = useRef(new Map<number, Region>());
  // Cancels a comparison still waiting for its second half.
  const compareTimer = useRef<number | null>(null);
  const compareStep = useRef<"first" | "last" | null>(null);
  const byN = useMemo(() => new Map(strokes.map((s) => [s.n, s])), [strokes]);
  const latest = useRef({ strokes, byN, thresholdDb });
  useEffect(() => {
    latest.current = { strokes, byN, thresholdDb };
  });

  const failPlayback = useCallback(() => {
    compareStep.current = null;
    setPlaying(null);
    setMessage("The browser would not play the recording. Tap again, or check the phone is not on silent.");
  }, []);

  const playStroke = useCallback(
    (n: number) => {
      const s = latest.current.byN.get(n);
      const w = ws.current;
      if (!s || !w) return;
      if (compareTimer.current !== null) window.clearTimeout(compareTimer.current);
      compareStep.current = null;
      setMessage(null);
      setActive(n);
      setPlaying({ kind: "stroke", n });
      w.play(s.startS, s.endS).catch(failPlayback);
    },
    [failPlayback],
  );
  useEffect(() => {
    const el = waveBox.current;
    if (!hasRecording || !el) return;
    let cancelled = false;
    let instance: WaveSurfer | null = null;
    const marked = regions.current;
    // Loaded on the client only: wavesurfer touches the DOM and Web Audio as it is imported.
    void Promise.all([import("wavesurfer.js"), import("wavesurfer.js/dist/plugins/regions.esm.js")])
      .then(([{ default: WaveSurferCtor }, { default: RegionsPlugin }]) => {
        if (cancelled) return;
        const plugin = RegionsPlugin.create();
        instance = WaveSurferCtor.create({
          container: el,
          url: `/api/sessions/${sessionId}/recording`,
          height: 120,
          waveColor: "#a8a29e",
          progressColor: INK,
          cursorColor: BRASS,
          normalize: true,
          plugins: [plugin],
        });
        ws.current = instance;
        instance.on("ready", () => {
          plugin.clearRegions();
          marked.clear();
          const { strokes: list, thresholdDb: threshold } = latest.current;
          for (const s of list) {
            const region = plugin.addRegion({
              id: `stroke-${s.n}`,
              start: s.startS,
              end: s.endS,
              color: contrastColour(s.contrastDb, threshold, 0.28),
              drag: false,
              resize: false,
            });
            region.element?.setAttribute("data-stroke", String(s.n));
            region.element?.addEventListener("mouseenter", () => setActive(s.n));
            region.element?.addEventListener("mouseleave", () => setActive((a) => (a === s.n ? null : a)));
            marked.set(s.n, region);
          }
          setRegionCount(marked.size);
          setLoad("ready");
        });
        instance.on("error", () => {
          setLoad("error");
          setMessage("The recording could not be loaded. Check the connection and reload the page.");
        });
        plugin.on("region-clicked", (region, e) => {
          e.stopPropagation();
          const n = Number(region.id.replace("stroke-", ""));
          if (Number.isFinite(n)) playStroke(n);
        });
        // While the recording plays through, the stroke being heard is the active one.
        plugin.on("region-in", (region) => setActive(Number(region.id.replace("stroke-", ""))));
        instance.on("pause", () => {
          if (compareStep.current === "first") return;
          compareStep.current = null;
          setPlaying(null);
        });
        instance.on("finish", () => setPlaying(null));
      })
      .catch(() => {
        if (cancelled) return;
        setLoad("error");
        setMessage("The waveform viewer could not start in this browser.");
      });
    return () => {
      cancelled = true;
      if (compareTimer.current !== null) window.clearTimeout(compareTimer.current);
      instance?.destroy();
      ws.current = null;
      marked.clear();
    };
  }, [hasRecording, sessionId, playStroke]);

  // Regions follow the active stroke: stronger colour and an outline.
  useEffect(() => {
    for (const [n, region] of regions.current) {
      const s = byN.get(n);
      if (!s) continue;
      const on = n === active;
      region.setOptions({ color: contrastColour(s.contrastDb, thresholdDb, on ? 0.6 : 0.28) });
      region.element?.style.setProperty("outline", on ? `2px solid ${INK}` : "");
    }
  }, [active, byN, thresholdDb, regionCount]);

  const compare = useCallback(() => {
    const list = latest.current.strokes;
    const w = ws.current;
    const first = list[0];
    const last = list[list.length - 1];
    if (!w || !first || !last) return;
    if (compareTimer.current !== null) window.clearTimeout(compareTimer.current);
    setMessage(null);
    compareStep.current = "first";
    setActive(first.n);
    setPlaying({ kind: "compare", step: "first" });
    w.play(first.startS, first.startS + COMPARE_SECONDS).catch(failPlayback);
    // The second half starts once the first has had its time and a breath of silence.
    compareTimer.current = window.setTimeout(() => {
      compareTimer.current = null;
      if (compareStep.current !== "first") return;
      compareStep.current = "last";
      setActive(last.n);
      setPlaying({ kind: "compare", step: "last" });
      w.play(last.startS, last.startS + COMPARE_SECONDS).catch(failPlayback);
    }, COMPARE_SECONDS * 1000 + COMPARE_GAP_MS);
  }, [failPlayback]);

  const stop = () => {
    if (compareTimer.current !== null) window.clearTimeout(compareTimer.current);
    compareStep.current = null;
    ws.current?.pause();
    setPlaying(null);
  };

  const playingLabel =
    playing === null
      ? ""
      : playing.kind === "stroke"
        ? `stroke-${playing.n}`
        : `compare-${playing.step}`;
  const canPlay = hasRecording && load === "ready";

  return (
    <div className="flex flex-col gap-4" data-testid="session-review" data-playing={playingLabel} data-active={active ?? ""}>
      <div className="grid grid-cols-1 gap-4 lg:grid-cols-[3fr_2fr]">
        <section aria-labelledby="recording-heading" className="rounded-xl border border-stone-300 bg-white p-4">
          <h2 id="recording-heading" className="mb-2 font-semibold">
            Recording
          </h2>
          {hasRecording ? (
            <>
              <div
                ref={waveBox}
                data-testid="waveform"
                data-state={load}
                data-regions={regionCount}
                className="min-h-[120px] w-full"
                aria-label={`Waveform of the session with ${strokes.length} strokes marked`}
              />
              {load === "loading" ? (
                <p className="mt-2 text-sm text-stone-600" aria-live="polite">
                  Loading the recording…
                </p>
              ) : null}
              <div className="mt-3 flex flex-wrap gap-2">
                <button
                  type="button"
                  onClick={compare}
                  disabled={!canPlay || strokes.length < 2}
                  className="min-h-12 rounded-lg bg-ink px-4 font-semibold text-white disabled:opacity-40"
                >
                  Compare first and last
                </button>
                <button
                  type="button"
                  onClick={stop}
                  disabled={playing === null}
                  className="min-h-12 rounded-lg border border-stone-400 px-4 font-semibold disabled:opacity-40"
                >
                  Stop
                </button>
              </div>
              <p className="mt-2 text-sm text-stone-600" aria-live="polite">
                {playing?.kind === "stroke"
                  ? `Playing stroke ${playing.n}`
                  : playing?.kind === "compare"
                    ? playing.step === "first"
                      ? `First stroke's start (${COMPARE_SECONDS} s)…`
                      : `…then the last stroke's start (${COMPARE_SECONDS} s)`
                    : "Tap a marked stroke or a row of the table to hear it."}
              </p>
            </>
          ) : (
            <p className="rounded-lg border border-dashed border-stone-400 p-6 text-center" data-testid="no-recording">
              This session was not recorded. The strokes below were saved from the phone&apos;s live analysis.
            </p>
          )}
          {message ? (
            <p role="alert" data-testid="review-message" className="mt-2 rounded-lg bg-rose-50 p-3 text-sm text-rose-900">
              {message}
            </p>
          ) : null}
        </section>
        <section aria-labelledby="fade-heading" className="rounded-xl border border-stone-300 bg-white p-4">
          <h2 id="fade-heading" className="mb-2 font-semibold">
            Fade curve
          </h2>
          <ReviewFadeChart strokes={strokes} fit={fit} thresholdDb={thresholdDb} active={active} onHover={setActive} />
        </section>
      </div>
      <section aria-labelledby="strokes-heading" className="rounded-xl border border-stone-300 bg-white p-4">
        <h2 id="strokes-heading" className="mb-2 font-semibold">
          Strokes
        </h2>
        {strokes.length === 0 ? (
          <p className="text-stone-600">No strokes were saved in this session.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full min-w-[36rem] text-left text-sm" data-testid="stroke-table">
              <thead className="border-b border-stone-300 text-stone-600">
                <tr>
                  <th className="py-2 pr-3">Stroke</th>
                  <th className="py-2 pr-3">Start</th>
                  <th className="py-2 pr-3">End</th>
                  <th className="py-2 pr-3">Onset</th>
                  <th className="py-2 pr-3">Body</th>
                  <th className="py-2 pr-3">Contrast</th>
                  <th className="py-2 pr-3" title="Body over the room's noise in the 2–10 kHz band">SNR</th>
                  <th className="py-2">Judged</th>
                </tr>
              </thead>
              <tbody>
                {strokes.map((s) => (
                  <tr
                    key={s.n}
                    data-stroke={s.n}
                    onMouseEnter={() => setActive(s.n)}
                    onMouseLeave={() => setActive((a) => (a === s.n ? null : a))}
                    onClick={() => canPlay && playStroke(s.n)}
                    aria-selected={active === s.n}
                    className={`figure border-b border-stone-200 ${canPlay ? "cursor-pointer" : ""} ${
                      active === s.n ? "bg-amber-100" : "hover:bg-stone-50"
                    }`}
                  >
                    <td className="py-2 pr-3 font-semibold">
                      {canPlay ? (
                        <button type="button" className="underline-offset-2 hover:underline" aria-label={`Play stroke ${s.n}`}>
                          {s.n}
                        </button>
                      ) : (
                        s.n
                      )}
                    </td>
                    <td className="py-2 pr-3">{s.startS.toFixed(2)} s</td>
                    <td className="py-2 pr-3">{s.endS.toFixed(2)} s</td>
                    <td className="py-2 pr-3">{s.onsetDb.toFixed(1)} dB</td>
                    <td className="py-2 pr-3">{s.bodyDb.toFixed(1)} dB</td>
                    <td className="py-2 pr-3 font-semibold">{s.contrastDb.toFixed(1)} dB</td>
                    <td className="py-2 pr-3">{s.bandSnrDb == null ? "—" : `${s.bandSnrDb.toFixed(0)} dB`}</td>
                    <td className="py-2">{s.flags.length ? `Left out: ${s.flags.map(flagText).join(", ")}` : "Yes"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </div>
  );
}

/** The fade curve for review: like the bench's, plus a ring on the active stroke and hover to pick one. */
function ReviewFadeChart({
  strokes,
  fit,
  thresholdDb,
  active,
  onHover,
  height = 220,
}: {
  strokes: ReviewStroke[];
  fit: FadeFit | null;
  thresholdDb: number;
  active: number | null;
  onHover: (n: number | null) => void;
  height?: number;
}) {
  const box = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef({ strokes, fit, thresholdDb, active, onHover });
  useEffect(() => {
    latest.current = { strokes, fit, thresholdDb, active, onHover };
  });

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    const data = (): uPlot.AlignedData => fadeData(latest.current.strokes, latest.current.fit);
    let hovered: number | null = null;
    const u = new uPlot(
      {
        width: el.clientWidth || 320,
        height,
        legend: { show: false },
        cursor: { x: false, y: false, points: { show: false } },
        scales: {
          x: {
            time: false,
            range: () => {
              const ns = latest.current.strokes.map((s) => s.n);
              return [Math.min(1, ...ns) - 0.5, Math.max(8, ...ns) + 0.5];
            },
          },
          y: {
            range: () => fadeYRange(latest.current.strokes.map((s) => s.contrastDb)),
          },
        },
        axes: fadeAxes(13),
        series: fadeSeries(),
        hooks: {
          drawClear: [shadeSettledZone(() => latest.current.thresholdDb)],
          // The active stroke gets a ring, drawn over the series.
          draw: [
            (p) => {
              const { strokes: list, active: n } = latest.current;
              const s = list.find((x) => x.n === n);
              if (!s) return;
              const x = p.valToPos(s.n, "x", true);
              const y = p.valToPos(s.contrastDb, "y", true);
              p.ctx.save();
              p.ctx.strokeStyle = INK;
              p.ctx.lineWidth = 3 * devicePixelRatio;
              p.ctx.beginPath();
              p.ctx.arc(x, y, 9 * devicePixelRatio, 0, 2 * Math.PI);
              p.ctx.stroke();
              p.ctx.restore();
            },
          ],
          // Hovering picks the nearest stroke by its number, so a point need not be hit exactly.
          setCursor: [
            (p) => {
              const left = p.cursor.left ?? -1;
              const list = latest.current.strokes;
              let next: number | null = null;
              if (left >= 0 && list.length) {
                const at = p.posToVal(left, "x");
                let best = list[0]!;
                for (const s of list) if (Math.abs(s.n - at) < Math.abs(best.n - at)) best = s;
                if (Math.abs(best.n - at) <= 0.75) next = best.n;
              }
              if (next !== hovered) {
                hovered = next;
                latest.current.onHover(next);
              }
            },
          ],
        },
      },
      data(),
      el,
    );
    plot.current = u;
    const resize = new ResizeObserver(() => u.setSize({ width: el.clientWidth, height }));
    resize.observe(el);
    return () => {
      resize.disconnect();
      u.destroy();
      plot.current = null;
    };
  }, [height]);

  useEffect(() => {
    plot.current?.setData(fadeData(strokes, fit));
  }, [strokes, fit, thresholdDb]);
  useEffect(() => {
    plot.current?.redraw(false, false);
  }, [active]);

  return (
    <div
      ref={box}
      style={{ height }}
      data-testid="review-fade-chart"
      data-active={active ?? ""}
      role="img"
      aria-label={
        strokes.length
          ? `Fade curve of ${strokes.length} strokes, from ${strokes[0]!.contrastDb.toFixed(1)} dB to ${strokes[strokes.length - 1]!.contrastDb.toFixed(1)} dB onset contrast`
          : "Fade curve: no strokes in this session"
      }
    />
  );
}
