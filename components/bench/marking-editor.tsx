"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useActionState, useEffect, useMemo, useRef, useState } from "react";
import { deleteTemplateAction, saveMeasurementsAction, saveTemplateAction } from "@/app/actions/bench";
import { SafetyNotice } from "@/components/ui/safety";
import { DyePicker, type DyeOption } from "./dye-picker";

type Shape = "rect" | "ellipse";
type Role = "vial" | "reference";

type Mark = {
  key: string;
  role: Role;
  shape: Shape;
  x: number;
  y: number;
  w: number;
  h: number;
  label: string;
  dyeId: string;
  solventId: string;
  acidBase: "acid" | "neutral" | "base";
  ph: string;
  conc: string;
  flagReason: string;
  refL: string;
  refA: string;
  refB: string;
};

type Colour = { lab: number[]; lch: number[]; hex: string; pixels: number; rejected: number; spread: number; flags: string[]; uncertainty?: { uDeltaE00: number } };
type RefResult = { region: { x: number; y: number }; correctedLab: number[]; profileLab: number[]; driftDeltaE00: number; flags: string[] };
type Live = { vials: Record<string, { ok: true; colour: Colour } | { ok: false; error: string }>; references: Record<string, RefResult>; correction?: string; photoFlags: string[]; error?: string; busy: boolean };

export type SolventOption = { id: string; name: string; medium: "protic" | "dipolar-aprotic" | "nonpolar"; cautions: string };
export type ProfileOption = { id: string; name: string; validNow: boolean; approved: boolean };
export type TemplateOption = { id: string; name: string; regions: { shape: Shape; x: number; y: number; w: number; h: number; role: Role; label: string }[] };
export type PatchOption = { label: string; lab: [number, number, number] };

const MEDIUM_LABEL = { protic: "protic", "dipolar-aprotic": "dipolar aprotic", nonpolar: "non-polar" } as const;
const ZOOMS = [0.5, 0.75, 1, 1.5, 2, 3, 4];
const FLAG_TEXT: Record<string, string> = {
  "too-few-pixels": "too few pixels",
  "much-rejected": "many pixels rejected (glare, label or edge)",
  "non-uniform": "not one colour (meniscus, bubbles, gradient)",
  "near-clipping": "near the camera's limit",
  "out-of-srgb-gamut": "outside sRGB (screen colour approximate)",
  uncorrected: "no light correction (no profile, no reference)",
  "reference-drift": "the light differs from the profile",
  "profile-not-valid-then": "profile not valid on the photo's date",
};

let serial = 0;
const newKey = () => `m${Date.now().toString(36)}${(serial++).toString(36)}`;
const fmt = (v: number, d = 1) => (Number.isFinite(v) ? v.toFixed(d) : "—");
const parseNum = (s: string): number | null => (s.trim() === "" ? null : Number(s.replace(",", ".")));

export function MarkingEditor(props: {
  photo: { id: string; width: number; height: number; name: string; lightingProfileId: string | null };
  displayUrl: string;
  dyes: DyeOption[];
  solvents: SolventOption[];
  profiles: ProfileOption[];
  templates: TemplateOption[];
  patches: PatchOption[];
}) {
  const { photo } = props;
  const W = photo.width;
  const H = photo.height;
  const router = useRouter();
  const [marks, setMarks] = useState<Mark[]>([]);
  const [selected, setSelected] = useState<string | null>(null);
  const [zoom, setZoom] = useState(1);
  const [newShape, setNewShape] = useState<Shape>("rect");
  const [newRole, setNewRole] = useState<Role>("vial");
  const [profileId, setProfileId] = useState(photo.lightingProfileId ?? "");
  const [live, setLive] = useState<Live>({ vials: {}, references: {}, photoFlags: [], busy: false });
  const [dupCount, setDupCount] = useState(1);
  const [note, setNote] = useState<string | null>(null);
  const [templateName, setTemplateName] = useState("");
  const [templateChoice, setTemplateChoice] = useState(props.templates[0]?.id ?? "");
  const svgRef = useRef<SVGSVGElement>(null);
  const wrapRef = useRef<HTMLDivElement>(null);
  // At 100 % the whole photo fits the space beside the region list (and 72 % of the window's height).
  const [fit, setFit] = useState(800);
  const [ready, setReady] = useState(false);
  useEffect(() => {
    const el = wrapRef.current;
    if (!el) return;
    const measureFit = () => setFit(Math.max(240, Math.min(el.clientWidth - 2, ((window.innerHeight * 0.72) * W) / H)));
    measureFit();
    setReady(true);
    const observer = new ResizeObserver(measureFit);
    observer.observe(el);
    return () => observer.disconnect();
  }, [W, H]);
  const drag = useRef<{ mode: "draw" | "move" | "resize"; key: string; start: { x: number; y: number }; orig: { x: number; y: number; w: number; h: number }; handle?: string } | null>(null);

  const [saveState, saveAction, saving] = useActionState(saveMeasurementsAction, null);
  const [tplState, tplAction, tplSaving] = useActionState(saveTemplateAction, null);
  const [delState, delAction] = useActionState(deleteTemplateAction, null);

  const scale = (fit * zoom) / W; // CSS px per photo px
  const handle = 18 / scale;
  const vials = marks.filter((m) => m.role === "vial");
  const refs = marks.filter((m) => m.role === "reference");
  const sel = marks.find((m) => m.key === selected) ?? null;

  const update = (key: string, patch: Partial<Mark>) => setMarks((all) => all.map((m) => (m.key === key ? { ...m, ...patch } : m)));
  const clampBox = (b: { x: number; y: number; w: number; h: number }) => {
    const w = Math.max(1, Math.min(Math.round(b.w), W));
    const h = Math.max(1, Math.min(Math.round(b.h), H));
    return { w, h, x: Math.max(0, Math.min(Math.round(b.x), W - w)), y: Math.max(0, Math.min(Math.round(b.y), H - h)) };
  };

  function addMark(box: { x: number; y: number; w: number; h: number }, role: Role, shape: Shape, from?: Mark): Mark {
    const sameRole = marks.filter((m) => m.role === role).length;
    const lastVial = [...marks].reverse().find((m) => m.role === "vial");
    const base = from ?? lastVial;
    return {
      key: newKey(),
      role,
      shape,
      ...clampBox(box),
      label: role === "vial" ? `Vial ${sameRole + 1}` : `Reference ${sameRole + 1}`,
      dyeId: base?.dyeId ?? "",
      solventId: from?.solventId ?? "",
      acidBase: base?.acidBase ?? "neutral",
      ph: base?.ph ?? "",
      conc: base?.conc ?? "",
      flagReason: "",
      refL: from?.refL ?? "",
      refA: from?.refA ?? "",
      refB: from?.refB ?? "",
    };
  }

  // ------------------------------------------------------------ pointer editing

  const toPhoto = (e: { clientX: number; clientY: number }) => {
    const r = svgRef.current!.getBoundingClientRect();
    return { x: ((e.clientX - r.left) / r.width) * W, y: ((e.clientY - r.top) / r.height) * H };
  };

  const onPointerDown = (e: React.PointerEvent<SVGSVGElement>) => {
    if (e.button !== 0) return;
    const target = e.target as Element;
    const key = target.getAttribute("data-key");
    const h = target.getAttribute("data-handle");
    const p = toPhoto(e);
    svgRef.current!.setPointerCapture(e.pointerId);
    svgRef.current!.focus();
    if (key) {
      const m = marks.find((x) => x.key === key)!;
      setSelected(key);
      drag.current = { mode: h ? "resize" : "move", key, start: p, orig: { x: m.x, y: m.y, w: m.w, h: m.h }, handle: h ?? undefined };
    } else {
      const m = addMark({ x: p.x, y: p.y, w: 1, h: 1 }, newRole, newShape);
      setMarks((all) => [...all, m]);
      setSelected(m.key);
      drag.current = { mode: "draw", key: m.key, start: p, orig: { x: p.x, y: p.y, w: 0, h: 0 } };
    }
  };

  const onPointerMove = (e: React.PointerEvent<SVGSVGElement>) => {
    const d = drag.current;
    if (!d) return;
    const p = toPhoto(e);
    const dx = p.x - d.start.x;
    const dy = p.y - d.start.y;
    if (d.mode === "draw") {
      const x0 = Math.max(0, Math.min(d.start.x, p.x));
      const y0 = Math.max(0, Math.min(d.start.y, p.y));
      const x1 = Math.min(W, Math.max(d.start.x, p.x));
      const y1 = Math.min(H, Math.max(d.start.y, p.y));
      update(d.key, clampBox({ x: x0, y: y0, w: x1 - x0, h: y1 - y0 }));
    } else if (d.mode === "move") {
      update(d.key, clampBox({ ...d.orig, x: d.orig.x + dx, y: d.orig.y + dy }));
    } else {
      let { x, y, w, h } = d.orig;
      if (d.handle!.includes("e")) w = Math.max(2, w + dx);
      if (d.handle!.includes("s")) h = Math.max(2, h + dy);
      if (d.handle!.includes("w")) {
        const nx = Math.min(x + w - 2, Math.max(0, x + dx));
        w = w + (x - nx);
        x = nx;
      }
      if (d.handle!.includes("n")) {
        const ny = Math.min(y + h - 2, Math.max(0, y + dy));
        h = h + (y - ny);
        y = ny;
      }
      update(d.key, clampBox({ x, y, w: Math.min(w, W - x), h: Math.min(h, H - y) }));
    }
  };

  const onPointerUp = () => {
    const d = drag.current;
    drag.current = null;
    if (d?.mode === "draw") {
      const m = marks.find((x) => x.key === d.key);
      // A click without a drag makes no region.
      if (m && (m.w < 4 || m.h < 4)) {
        setMarks((all) => all.filter((x) => x.key !== d.key));
        setSelected(null);
      }
    }
  };

  // ------------------------------------------------------------ rack helpers

  function rackStep(): { dx: number; dy: number } {
    if (vials.length >= 2) {
      const [a, b] = vials.slice(-2);
      return { dx: b.x - a.x, dy: b.y - a.y };
    }
    const m = sel ?? vials[0];
    return { dx: Math.round((m?.w ?? 50) * 1.3), dy: 0 };
  }

  function duplicateAlongRack(count = dupCount) {
    const from = sel ?? vials[vials.length - 1];
    if (!from) return setNote("Draw one region first, then duplicate it along the rack.");
    const { dx, dy } = from.role === "vial" ? rackStep() : { dx: Math.round(from.w * 1.3), dy: 0 };
    const made: Mark[] = [];
    let cur = from;
    let stopped = false;
    for (let i = 0; i < count; i++) {
      const box = { x: cur.x + dx, y: cur.y + dy, w: cur.w, h: cur.h };
      if (box.x < 0 || box.y < 0 || box.x + box.w > W || box.y + box.h > H) {
        stopped = true;
        break;
      }
      const m = { ...addMark(box, from.role, from.shape, cur), label: `${from.role === "vial" ? "Vial" : "Reference"} ${marks.filter((x) => x.role === from.role).length + made.length + 1}` };
      made.push(m);
      cur = m;
    }
    setMarks((all) => [...all, ...made]);
    if (made.length) setSelected(made[made.length - 1].key);
    setNote(
      stopped
        ? `Stopped at the edge of the photo after ${made.length}.`
        : vials.length < 2 && from.role === "vial"
          ? "Move the copy onto the next vial; further copies keep the spacing between the last two vials."
          : null,
    );
  }

  function renumber() {
    const order = [...vials].sort((a, b) => a.x - b.x || a.y - b.y).map((m) => m.key);
    setMarks((all) => all.map((m) => (m.role === "vial" ? { ...m, label: `Vial ${order.indexOf(m.key) + 1}` } : m)));
  }

  function applyTemplate(id: string) {
    const t = props.templates.find((x) => x.id === id);
    if (!t) return;
    const first = vials[0];
    let vi = 0;
    const made = t.regions.map((r) => {
      const m = addMark({ x: r.x * W, y: r.y * H, w: r.w * W, h: r.h * H }, r.role, r.shape, r.role === "vial" ? first : undefined);
      return { ...m, label: r.label || (r.role === "vial" ? `Vial ${++vi}` : "Reference") };
    });
    setMarks(made);
    setSelected(made[0]?.key ?? null);
    setNote(`Applied the layout “${t.name}”: ${made.length} regions. Move them onto the vials if the rack sits differently.`);
  }

  // ------------------------------------------------------------ keyboard

  const onKeyDown = (e: React.KeyboardEvent) => {
    if (e.key === "+" || e.key === "=") return setZoom((z) => ZOOMS[Math.min(ZOOMS.indexOf(z) + 1, ZOOMS.length - 1)]);
    if (e.key === "-") return setZoom((z) => ZOOMS[Math.max(ZOOMS.indexOf(z) - 1, 0)]);
    if (e.key === "n" || e.key === "p") {
      if (!marks.length) return;
      const i = marks.findIndex((m) => m.key === selected);
      const next = e.key === "n" ? (i + 1) % marks.length : (i - 1 + marks.length) % marks.length;
      return setSelected(marks[next].key);
    }
    if (!sel) return;
    const step = e.shiftKey ? 10 : 1;
    const moves: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
    if (moves[e.key]) {
      e.preventDefault();
      const [dx, dy] = moves[e.key];
      if (e.altKey) update(sel.key, clampBox({ ...sel, w: Math.max(2, sel.w + dx), h: Math.max(2, sel.h + dy) }));
      else update(sel.key, clampBox({ ...sel, x: sel.x + dx, y: sel.y + dy }));
    } else if (e.key === "Delete" || e.key === "Backspace") {
      e.preventDefault();
      setMarks((all) => all.filter((m) => m.key !== sel.key));
      setSelected(null);
    } else if (e.key === "d") duplicateAlongRack(1);
    else if (e.key === "e") update(sel.key, { shape: sel.shape === "rect" ? "ellipse" : "rect" });
    else if (e.key === "r") update(sel.key, { role: sel.role === "vial" ? "reference" : "vial" });
    else if (e.key === "Escape") setSelected(null);
  };

  // ------------------------------------------------------------ live measurement

  const refInputs = refs
    .map((r) => ({ key: r.key, lab: [parseNum(r.refL), parseNum(r.refA), parseNum(r.refB)] as (number | null)[], region: { shape: r.shape, x: r.x, y: r.y, w: r.w, h: r.h }, label: r.label }))
    .filter((r) => r.lab.every((v) => v !== null && Number.isFinite(v)));
  const geometry = JSON.stringify([profileId, vials.map((m) => [m.key, m.shape, m.x, m.y, m.w, m.h]), refInputs]);

  useEffect(() => {
    if (vials.length === 0 && refInputs.length === 0) {
      setLive({ vials: {}, references: {}, photoFlags: [], busy: false });
      return;
    }
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      setLive((l) => ({ ...l, busy: true }));
      try {
        const res = await fetch(`/api/photos/${photo.id}/measure`, {
          method: "POST",
          headers: { "content-type": "application/json" },
          signal: controller.signal,
          body: JSON.stringify({
            lightingProfileId: profileId || null,
            references: refInputs.map((r) => ({ region: r.region, lab: r.lab, label: r.label })),
            vials: vials.map((m) => ({ key: m.key, region: { shape: m.shape, x: m.x, y: m.y, w: m.w, h: m.h } })),
          }),
        });
        const body = await res.json();
        if (!res.ok) {
          setLive({ vials: {}, references: {}, photoFlags: [], busy: false, error: body.error?.message ?? `The server answered ${res.status}.` });
          return;
        }
        const refMap: Record<string, RefResult> = {};
        (body.references as RefResult[]).forEach((r, i) => (refMap[refInputs[i].key] = r));
        setLive({
          vials: Object.fromEntries((body.vials as ({ key: string } & Live["vials"][string])[]).map((v) => [v.key, v])),
          references: refMap,
          photoFlags: body.photoFlags,
          correction: body.correction.kind,
          busy: false,
        });
      } catch (error) {
        if ((error as Error).name !== "AbortError") setLive((l) => ({ ...l, busy: false, error: "Could not reach the server to measure; check the connection." }));
      }
    }, 300);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
    // geometry captures every input of the measurement.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [geometry, photo.id]);

  // ------------------------------------------------------------ saving

  const problems: string[] = [];
  if (vials.length === 0) problems.push("Mark at least one vial.");
  for (const r of refs) if (!refInputs.some((x) => x.key === r.key)) problems.push(`${r.label} needs its known L*, a*, b* (from the tile's certificate).`);
  for (const v of vials) {
    if (!v.dyeId) problems.push(`${v.label} needs a dye.`);
    if (!v.solventId) problems.push(`${v.label} needs a solvent.`);
    const ph = parseNum(v.ph);
    if (ph !== null && !(ph >= -2 && ph <= 16)) problems.push(`${v.label}: pH must be between −2 and 16.`);
    const c = parseNum(v.conc);
    if (c !== null && !(c > 0)) problems.push(`${v.label}: the concentration must be a positive number of µmol/L.`);
    const r = live.vials[v.key];
    if (r && !r.ok) problems.push(`${v.label}: ${r.error}`);
    if (r?.ok && r.colour.flags.length > 0 && !v.flagReason.trim()) problems.push(`${v.label} is flagged; say why it should be kept, or re-mark it.`);
  }
  const measuredAll = vials.every((v) => live.vials[v.key]?.ok) && !live.busy;

  const payload = JSON.stringify({
    photoId: photo.id,
    lightingProfileId: profileId || null,
    references: refInputs.map((r) => ({ region: r.region, lab: r.lab, label: r.label })),
    vials: vials.map((v) => ({
      region: { shape: v.shape, x: v.x, y: v.y, w: v.w, h: v.h },
      dyeId: v.dyeId,
      solventId: v.solventId,
      acidBase: v.acidBase,
      ph: parseNum(v.ph),
      concentrationUmolL: parseNum(v.conc),
      flagReason: v.flagReason,
    })),
  });
  const templatePayload = JSON.stringify({
    name: templateName,
    regions: marks.map((m) => ({ shape: m.shape, x: m.x / W, y: m.y / H, w: m.w / W, h: m.h / H, role: m.role, label: m.label })),
  });

  const lastSaved = useRef<unknown>(null);
  useEffect(() => {
    if (saveState?.ok && lastSaved.current !== saveState) {
      lastSaved.current = saveState;
      setMarks((all) => all.filter((m) => m.role === "reference"));
      setSelected(null);
      router.refresh();
    }
  }, [saveState, router]);
  useEffect(() => {
    if (tplState?.ok || delState?.ok) router.refresh();
  }, [tplState, delState, router]);

  const inUse = useMemo(() => {
    const ids = new Set(vials.map((v) => v.solventId).filter(Boolean));
    return props.solvents.filter((s) => ids.has(s.id)).map((s) => ({ name: s.name, cautions: s.cautions || "Read the supplier's safety data sheet before use." }));
  }, [vials, props.solvents]);

  const byMedium = (["protic", "dipolar-aprotic", "nonpolar"] as const).map((m) => ({ medium: m, list: props.solvents.filter((s) => s.medium === m) }));
  const fieldErr = (i: number, f: string) => (saveState && !saveState.ok ? saveState.fieldErrors?.[`vials.${i}.${f}`]?.join(" ") : undefined);

  // ------------------------------------------------------------ render

  return (
    <div className="space-y-4">
      <SafetyNotice solvents={inUse} />
      <div className="flex flex-wrap items-end gap-3 rounded-xl border border-line bg-white p-3">
        <div className="space-y-1">
          <label htmlFor="profile" className="block text-xs font-semibold uppercase tracking-wide text-ink-soft">
            Lighting profile of this photo
          </label>
          <select id="profile" value={profileId} onChange={(e) => setProfileId(e.target.value)} className="min-h-11 rounded-lg border border-line bg-white px-2 text-sm">
            <option value="">None (reference only)</option>
            {props.profiles.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
                {p.approved ? "" : " (not approved)"}
                {p.validNow ? "" : " (expired)"}
              </option>
            ))}
          </select>
        </div>
        <fieldset className="flex items-center gap-1">
          <legend className="text-xs font-semibold uppercase tracking-wide text-ink-soft">New region</legend>
          {(["vial", "reference"] as const).map((r) => (
            <button key={r} type="button" aria-pressed={newRole === r} onClick={() => setNewRole(r)} className={`min-h-11 rounded-lg border px-3 text-sm font-semibold ${newRole === r ? "border-accent bg-accent-soft text-accent" : "border-line"}`}>
              {r === "vial" ? "Vial" : "Reference"}
            </button>
          ))}
          {(["rect", "ellipse"] as const).map((s) => (
            <button key={s} type="button" aria-pressed={newShape === s} onClick={() => setNewShape(s)} className={`min-h-11 rounded-lg border px-3 text-sm font-semibold ${newShape === s ? "border-accent bg-accent-soft text-accent" : "border-line"}`}>
              {s === "rect" ? "Rectangle" : "Ellipse"}
            </button>
          ))}
        </fieldset>
        <div className="flex items-center gap-1">
          <button type="button" onClick={() => setZoom((z) => ZOOMS[Math.max(ZOOMS.indexOf(z) - 1, 0)])} className="min-h-11 min-w-11 rounded-lg border border-line text-lg font-bold" aria-label="Zoom out">
            −
          </button>
          <span className="w-14 text-center text-sm tabular-nums" aria-live="polite">
            {Math.round(zoom * 100)} %
          </span>
          <button type="button" onClick={() => setZoom((z) => ZOOMS[Math.min(ZOOMS.indexOf(z) + 1, ZOOMS.length - 1)])} className="min-h-11 min-w-11 rounded-lg border border-line text-lg font-bold" aria-label="Zoom in">
            +
          </button>
        </div>
        <div className="flex items-center gap-1">
          <button
            type="button"
            onClick={() => {
              const m = addMark({ x: W * 0.45, y: H * 0.35, w: Math.max(8, W * 0.08), h: Math.max(8, H * 0.3) }, newRole, newShape);
              setMarks((all) => [...all, m]);
              setSelected(m.key);
              svgRef.current?.focus();
            }}
            className="min-h-11 rounded-lg border border-line px-3 text-sm font-semibold"
          >
            Add a region
          </button>
          <button type="button" onClick={() => duplicateAlongRack()} disabled={marks.length === 0} className="min-h-11 rounded-lg border border-line px-3 text-sm font-semibold disabled:opacity-40">
            Duplicate along the rack
          </button>
          <label htmlFor="dup-count" className="sr-only">
            How many copies
          </label>
          <select id="dup-count" value={dupCount} onChange={(e) => setDupCount(Number(e.target.value))} className="min-h-11 rounded-lg border border-line px-2 text-sm">
            {[1, 2, 3, 4, 5, 6, 7, 8, 11].map((n) => (
              <option key={n} value={n}>
                ×{n}
              </option>
            ))}
          </select>
          <button type="button" onClick={renumber} disabled={vials.length < 2} className="min-h-11 rounded-lg border border-line px-3 text-sm font-semibold disabled:opacity-40">
            Number left to right
          </button>
        </div>
      </div>
      {note && (
        <p role="status" className="text-sm text-ink-soft">
          {note}
        </p>
      )}

      <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_26rem]">
        <div>
          <div ref={wrapRef} className="max-h-[75vh] overflow-auto rounded-xl border border-line bg-[#1b1f27]">
            <div className="relative" style={{ width: fit * zoom, height: fit * zoom * (H / W) }}>
              {/* eslint-disable-next-line @next/next/no-img-element */}
              <img src={props.displayUrl} alt={`Rack photo ${photo.name}`} draggable={false} className="absolute inset-0 h-full w-full select-none" />
              <svg
                ref={svgRef}
                data-testid="marking-canvas"
                data-ready={ready ? "true" : undefined}
                viewBox={`0 0 ${W} ${H}`}
                preserveAspectRatio="none"
                className="absolute inset-0 h-full w-full cursor-crosshair touch-none focus:outline-none focus-visible:ring-4 focus-visible:ring-accent/50"
                tabIndex={0}
                role="application"
                aria-label="Photo: drag on it to mark a region. Arrow keys move the selected region (Shift: 10 px, Alt: resize); D duplicates it along the rack; E switches rectangle/ellipse; R switches vial/reference; N and P select the next or previous region; Delete removes it; + and − zoom."
                onPointerDown={onPointerDown}
                onPointerMove={onPointerMove}
                onPointerUp={onPointerUp}
                onPointerCancel={onPointerUp}
                onKeyDown={onKeyDown}
              >
                {marks.map((m) => {
                  const isSel = m.key === selected;
                  const r = live.vials[m.key];
                  const colour = m.role === "reference" ? "#ffffff" : r && r.ok && r.colour.flags.length ? "#f59e0b" : "#5eead4";
                  const common = { "data-key": m.key, fill: isSel ? "rgba(255,255,255,0.12)" : "rgba(255,255,255,0.02)", stroke: colour, strokeWidth: isSel ? 3 : 2, vectorEffect: "non-scaling-stroke" as const, strokeDasharray: m.role === "reference" ? "6 4" : undefined, className: "cursor-move" };
                  return (
                    <g key={m.key} data-testid="region" data-label={m.label}>
                      {m.shape === "rect" ? <rect x={m.x} y={m.y} width={m.w} height={m.h} {...common} /> : <ellipse cx={m.x + m.w / 2} cy={m.y + m.h / 2} rx={m.w / 2} ry={m.h / 2} {...common} />}
                      <text x={m.x + 2 / scale} y={m.y - 6 / scale} fontSize={13 / scale} fill={colour} stroke="#111827" strokeWidth={3} paintOrder="stroke" vectorEffect="non-scaling-stroke" style={{ pointerEvents: "none", fontWeight: 600 }}>
                        {m.label}
                      </text>
                      {isSel &&
                        (["nw", "ne", "sw", "se"] as const).map((hd) => (
                          <rect
                            key={hd}
                            data-key={m.key}
                            data-handle={hd}
                            x={(hd.includes("w") ? m.x : m.x + m.w) - handle / 2}
                            y={(hd.includes("n") ? m.y : m.y + m.h) - handle / 2}
                            width={handle}
                            height={handle}
                            fill="#ffffff"
                            stroke="#5b2a86"
                            strokeWidth={2}
                            vectorEffect="non-scaling-stroke"
                            className={hd === "nw" || hd === "se" ? "cursor-nwse-resize" : "cursor-nesw-resize"}
                          />
                        ))}
                    </g>
                  );
                })}
              </svg>
            </div>
          </div>
          <p className="mt-2 text-xs text-ink-soft">
            {W}×{H} px after EXIF orientation. Drag on the photo to mark; drag a region to move it; drag a corner to resize. With the photo focused: arrows move (Shift ×10, Alt resizes), D duplicates along
            the rack, E ellipse/rectangle, R vial/reference, N/P next/previous, Delete removes, +/− zoom. Colours on screen are approximations; the numbers are the measurement.
          </p>

          <div className="mt-4 grid gap-3 rounded-xl border border-line bg-white p-4 2xl:grid-cols-2">
            <div className="space-y-2">
              <label htmlFor="template-choice" className="block text-sm font-semibold">
                Rack layouts
              </label>
              <div className="flex gap-2">
                <select id="template-choice" value={templateChoice} onChange={(e) => setTemplateChoice(e.target.value)} className="min-h-11 flex-1 rounded-lg border border-line px-2 text-sm">
                  {props.templates.length === 0 && <option value="">No saved layouts yet</option>}
                  {props.templates.map((t) => (
                    <option key={t.id} value={t.id}>
                      {t.name} ({t.regions.length} regions)
                    </option>
                  ))}
                </select>
                <button type="button" disabled={!templateChoice} onClick={() => applyTemplate(templateChoice)} className="min-h-11 rounded-lg border border-line px-3 text-sm font-semibold disabled:opacity-40">
                  Apply
                </button>
                <form action={delAction}>
                  <input type="hidden" name="id" value={templateChoice} />
                  <button disabled={!templateChoice} className="min-h-11 rounded-lg border border-bad/40 px-3 text-sm font-semibold text-bad disabled:opacity-40">
                    Delete
                  </button>
                </form>
              </div>
              {delState && !delState.ok && <p className="text-sm text-bad">{delState.message}</p>}
            </div>
            <form action={tplAction} className="space-y-2">
              <label htmlFor="template-name" className="block text-sm font-semibold">
                Save these regions as a layout
              </label>
              <div className="flex gap-2">
                <input id="template-name" value={templateName} onChange={(e) => setTemplateName(e.target.value)} placeholder="e.g. 8-vial rack, light box North" className="min-h-11 flex-1 rounded-lg border border-line px-3 text-sm" />
                <input type="hidden" name="payload" value={templatePayload} />
                <button disabled={tplSaving || marks.length === 0 || !templateName.trim()} className="min-h-11 rounded-lg border border-line px-3 text-sm font-semibold disabled:opacity-40">
                  Save layout
                </button>
              </div>
              {tplState && <p className={`text-sm ${tplState.ok ? "text-ok" : "text-bad"}`}>{tplState.message}</p>}
            </form>
          </div>
        </div>

        <div className="space-y-3">
          <div className="rounded-xl border border-line bg-white p-3 text-sm" aria-live="polite">
            <p className="font-semibold">
              {vials.length} vial{vials.length === 1 ? "" : "s"}, {refs.length} reference{refs.length === 1 ? "" : "s"}
              {live.busy ? " · measuring…" : ""}
            </p>
            <p className="text-ink-soft">
              {live.correction === "none" || !live.correction
                ? "No light correction: choose a profile or mark a white/grey reference of known Lab."
                : `Correction: ${profileId ? "profile" : ""}${profileId && refInputs.length ? " + " : ""}${refInputs.length ? "in-photo reference scaling" : ""} (${live.correction}).`}
            </p>
            {live.photoFlags.includes("white-card-only") && (
              <p className="text-warn" data-testid="white-card-only">White card only: no lighting profile stands behind these colours; expect a few ΔE00 (practitioner estimate).</p>
            )}
            {live.error && (
              <p role="alert" className="mt-1 text-bad">
                {live.error}
              </p>
            )}
          </div>

          <ol className="space-y-2" aria-label="Regions">
            {marks.map((m) => {
              const vi = vials.indexOf(m);
              const r = live.vials[m.key];
              const ref = live.references[m.key];
              const isSel = m.key === selected;
              return (
                <li
                  key={m.key}
                  data-testid="region-card"
                  data-label={m.label}
                  onFocusCapture={() => setSelected(m.key)}
                  className={`rounded-xl border bg-white p-3 ${isSel ? "border-accent ring-2 ring-accent/20" : "border-line"}`}
                >
                  <div className="mb-2 flex items-center justify-between gap-2">
                    <button type="button" onClick={() => setSelected(m.key)} className="min-h-11 text-left font-semibold">
                      {m.label} <span className="text-xs font-normal text-ink-soft">({m.role === "vial" ? "vial" : "reference"}, {m.shape === "rect" ? "rectangle" : "ellipse"}, {m.w}×{m.h} px)</span>
                    </button>
                    <div className="flex gap-1">
                      <button type="button" onClick={() => update(m.key, { role: m.role === "vial" ? "reference" : "vial" })} className="min-h-11 rounded-lg border border-line px-2 text-xs font-semibold">
                        {m.role === "vial" ? "Make reference" : "Make vial"}
                      </button>
                      <button type="button" aria-label={`Remove ${m.label}`} onClick={() => setMarks((all) => all.filter((x) => x.key !== m.key))} className="min-h-11 min-w-11 rounded-lg border border-bad/40 text-bad">
                        ✕
                      </button>
                    </div>
                  </div>

                  {m.role === "vial" ? (
                    <div className="grid grid-cols-2 gap-2">
                      <div className="col-span-2">
                        <DyePicker dyes={props.dyes} value={m.dyeId} onChange={(id) => update(m.key, { dyeId: id })} label={`Dye in ${m.label}`} />
                        {m.dyeId && vials.length > 1 && (
                          <button type="button" onClick={() => setMarks((all) => all.map((x) => (x.role === "vial" ? { ...x, dyeId: m.dyeId } : x)))} className="mt-1 min-h-11 text-xs font-semibold text-accent">
                            Same dye in every vial
                          </button>
                        )}
                      </div>
                      <div className="col-span-2 space-y-1">
                        <label htmlFor={`solvent-${m.key}`} className="block text-xs font-semibold uppercase tracking-wide text-ink-soft">
                          Solvent in {m.label}
                        </label>
                        <select id={`solvent-${m.key}`} value={m.solventId} onChange={(e) => update(m.key, { solventId: e.target.value })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm">
                          <option value="">Choose the solvent</option>
                          {byMedium.map((g) => (
                            <optgroup key={g.medium} label={MEDIUM_LABEL[g.medium]}>
                              {g.list.map((s) => (
                                <option key={s.id} value={s.id}>
                                  {s.name} — {MEDIUM_LABEL[s.medium]}
                                </option>
                              ))}
                            </optgroup>
                          ))}
                        </select>
                        {fieldErr(vi, "solventId") && <p className="text-xs text-bad">{fieldErr(vi, "solventId")}</p>}
                      </div>
                      <div className="space-y-1">
                        <label htmlFor={`ab-${m.key}`} className="block text-xs font-semibold uppercase tracking-wide text-ink-soft">
                          Condition
                        </label>
                        <select id={`ab-${m.key}`} value={m.acidBase} onChange={(e) => update(m.key, { acidBase: e.target.value as Mark["acidBase"] })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm">
                          <option value="acid">acid</option>
                          <option value="neutral">neutral</option>
                          <option value="base">base</option>
                        </select>
                      </div>
                      <div className="space-y-1">
                        <label htmlFor={`ph-${m.key}`} className="block text-xs font-semibold uppercase tracking-wide text-ink-soft">
                          pH (optional)
                        </label>
                        <input id={`ph-${m.key}`} inputMode="decimal" value={m.ph} onChange={(e) => update(m.key, { ph: e.target.value })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm" />
                      </div>
                      <div className="col-span-2 space-y-1">
                        <label htmlFor={`conc-${m.key}`} className="block text-xs font-semibold uppercase tracking-wide text-ink-soft">
                          Dye concentration, <span className="normal-case">µmol/L</span> (optional)
                        </label>
                        <input id={`conc-${m.key}`} inputMode="decimal" value={m.conc} onChange={(e) => update(m.key, { conc: e.target.value })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm" />
                      </div>
                    </div>
                  ) : (
                    <div className="space-y-2">
                      <p className="text-xs text-ink-soft">A white or grey patch of known CIELAB (D65) in this photo; its values come from the tile&apos;s certificate.</p>
                      {props.patches.length > 0 && (
                        <select
                          aria-label={`Fill ${m.label} from a calibration target`}
                          value=""
                          onChange={(e) => {
                            const p = props.patches[Number(e.target.value)];
                            if (p) update(m.key, { refL: String(p.lab[0]), refA: String(p.lab[1]), refB: String(p.lab[2]) });
                          }}
                          className="min-h-11 w-full rounded-lg border border-line px-2 text-sm"
                        >
                          <option value="">Fill from a calibration target…</option>
                          {props.patches.map((p, i) => (
                            <option key={i} value={i}>
                              {p.label}
                            </option>
                          ))}
                        </select>
                      )}
                      <div className="grid grid-cols-3 gap-2">
                        {(["refL", "refA", "refB"] as const).map((f, i) => (
                          <div key={f} className="space-y-1">
                            <label htmlFor={`${f}-${m.key}`} className="block text-xs font-semibold text-ink-soft">
                              Known {["L*", "a*", "b*"][i]} of {m.label}
                            </label>
                            <input id={`${f}-${m.key}`} inputMode="decimal" value={m[f]} onChange={(e) => update(m.key, { [f]: e.target.value })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm" />
                          </div>
                        ))}
                      </div>
                      {ref && (
                        <p className="text-xs text-ink-soft" data-testid="reference-result">
                          Seen through the profile: L* {fmt(ref.profileLab[0])} a* {fmt(ref.profileLab[1])} b* {fmt(ref.profileLab[2])} (ΔE00 {fmt(ref.driftDeltaE00, 2)} from its known value)
                          {ref.flags.length ? ` · ${ref.flags.map((f) => FLAG_TEXT[f] ?? f).join(", ")}` : ""}
                        </p>
                      )}
                    </div>
                  )}

                  {m.role === "vial" && r && (
                    <div className="mt-3 rounded-lg bg-paper/60 p-2" data-testid="live-colour">
                      {r.ok ? (
                        <div className="flex items-start gap-3">
                          <span role="img" aria-label={`Measured colour of ${m.label}`} className="h-14 w-14 shrink-0 rounded-md border border-black/10" style={{ backgroundColor: r.colour.hex }} />
                          <div className="text-xs tabular-nums">
                            <p className="font-semibold" data-testid="live-lab">
                              L* {fmt(r.colour.lab[0])} a* {fmt(r.colour.lab[1])} b* {fmt(r.colour.lab[2])}
                              {r.colour.uncertainty && <span data-testid="live-uncertainty"> (± {fmt(r.colour.uncertainty.uDeltaE00, 1)} ΔE00)</span>}
                            </p>
                            <p>
                              C* {fmt(r.colour.lch[1])} h° {fmt(r.colour.lch[2], 0)} · {r.colour.pixels} px, {r.colour.rejected} rejected, spread {fmt(r.colour.spread, 2)}
                            </p>
                            {r.colour.flags.length > 0 && (
                              <ul className="mt-1 flex flex-wrap gap-1" aria-label="Quality flags">
                                {r.colour.flags.map((f) => (
                                  <li key={f} className="rounded-full bg-amber-50 px-2 py-0.5 font-medium text-warn">
                                    {FLAG_TEXT[f] ?? f}
                                  </li>
                                ))}
                              </ul>
                            )}
                          </div>
                        </div>
                      ) : (
                        <p className="text-xs text-bad">{r.error}</p>
                      )}
                      {r.ok && r.colour.flags.length > 0 && (
                        <div className="mt-2 space-y-1">
                          <label htmlFor={`reason-${m.key}`} className="block text-xs font-semibold">
                            Why keep this flagged measurement?
                          </label>
                          <input id={`reason-${m.key}`} value={m.flagReason} onChange={(e) => update(m.key, { flagReason: e.target.value })} className="min-h-11 w-full rounded-lg border border-line px-2 text-sm" />
                          {fieldErr(vi, "flagReason") && <p className="text-xs text-bad">{fieldErr(vi, "flagReason")}</p>}
                        </div>
                      )}
                    </div>
                  )}
                </li>
              );
            })}
          </ol>

          <form action={saveAction} className="space-y-2 rounded-xl border border-line bg-white p-3">
            <input type="hidden" name="payload" value={payload} />
            {problems.length > 0 && (
              <ul className="list-disc space-y-0.5 pl-5 text-sm text-ink-soft" aria-label="Before saving">
                {problems.map((p, i) => (
                  <li key={i}>{p}</li>
                ))}
              </ul>
            )}
            <button disabled={saving || problems.length > 0 || !measuredAll} className="min-h-12 w-full rounded-lg bg-accent px-4 text-base font-semibold text-white disabled:opacity-40">
              {saving ? "Saving…" : `Save ${vials.length} measurement${vials.length === 1 ? "" : "s"}`}
            </button>
            {saveState && (
              <p role={saveState.ok ? "status" : "alert"} className={`text-sm ${saveState.ok ? "text-ok" : "text-bad"}`}>
                {saveState.message} {saveState.ok && <Link href={`/review?photoId=${photo.id}`} className="font-semibold underline">Open them in the review queue</Link>}
              </p>
            )}
          </form>
        </div>
      </div>
    </div>
  );
}
