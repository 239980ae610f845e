"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useActionState, useEffect, useMemo, useRef, useState } from "react";
import { deletePanelAction, deleteTemplateAction, saveMeasurementsAction, savePanelAction, saveTemplateAction } from "@/app/actions/bench";
import { SafetyNotice } from "@/components/ui/safety";
import { checkStandardRefusal } from "@/lib/bench/checks";
import { flagWords } from "@/lib/bench/flags";
import { labD65ToLabD50 } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import type { Lab } from "@/lib/color/types";
import { DyePicker, type DyeOption } from "./dye-picker";
import { FlagBadges } from "./flag-badges";

type Shape = "rect" | "ellipse";
type Role = "vial" | "reference" | "check";
const ROLE_NAME: Record<Role, string> = { vial: "Vial", reference: "Reference", check: "Check" };

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
  additive: string;
  addConc: string;
  temp: string;
  path: string;
  solvent2: string;
  x2: string;
  flagReason: string;
  refL: string;
  refA: string;
  refB: string;
  /** Full-precision values filled from a calibration target; used while the fields still show them rounded. */
  refExact: [number, number, number] | null;
  /** For a check region: the registered check standard it shows. */
  standardId: string;
};

/** The condition fields of a vial, copied as a group (panels, duplicates). */
const CONDITION_KEYS = ["solventId", "acidBase", "ph", "conc", "additive", "addConc", "temp", "path", "solvent2", "x2"] as const;
type ConditionPart = Pick<Mark, (typeof CONDITION_KEYS)[number]>;
const NEUTRAL: ConditionPart = { solventId: "", acidBase: "neutral", ph: "", conc: "", additive: "", addConc: "", temp: "", path: "", solvent2: "", x2: "" };
const conditionOf = (m: Mark): ConditionPart => Object.fromEntries(CONDITION_KEYS.map((k) => [k, m[k]])) as ConditionPart;

type Colour = { lab: number[]; lch: number[]; hex: string; pixels: number; rejected: number; spread: number; flags: string[]; uncertainty?: { uDeltaE00: number } | null };
type Replicate = { flags: string[]; earlier: { id: string; lab: number[]; hex: string }[]; verdict: { deltaE00: number; limitDeltaE00: number; disagrees: boolean; spreadDeltaE00: number; n: number } | null };
type RefResult = { region: { x: number; y: number }; correctedLab: number[]; profileLab: number[]; driftDeltaE00: number; flags: string[] };
/** `forKey`: the regions, references and profile this answer was measured for (stale once they change). */
type Live = { vials: Record<string, { ok: true; colour: Colour } | { ok: false; error: string }>; references: Record<string, RefResult>; correction?: string; photoFlags: string[]; error?: string; busy: boolean; forKey?: string };

export type SolventOption = { id: string; name: string; medium: "protic" | "dipolar-aprotic" | "nonpolar"; cautions: string };
export type ProfileOption = { id: string; name: string; validNow: boolean; approved: boolean };
export type TemplateOption = { id: string; name: string; regions: { shape: Shape; x: number; y: number; w: number; h: number; role: Role; label: string }[] };
export type PatchOption = { label: string; lab: [number, number, number] };
export type CheckStandardOption = { id: string; name: string; kind: "vial" | "tile"; lab: [number, number, number]; whitePoint: "D65" | "D50" };
export type PanelOption = { id: string; name: string; entries: { solventId: string; acidBase: "acid" | "neutral" | "base"; ph: number | null; concentrationUmolL?: number | null; additive: string; additiveConcentrationMolL: number | null; temperatureC: number | null; pathLengthMm: number | null; secondSolventId: string | null; secondSolventMoleFraction: number | null }[] };

const MEDIUM_LABEL = { protic: "protic", "dipolar-aprotic": "dipolar aprotic", nonpolar: "non-polar" } as const;
const ZOOMS = [0.5, 0.75, 1, 1.5, 2, 3, 4];

let serial = 0;
const newKey = () => `m${Date.now().toString(36)}${(serial++).toString(36)}`;
const fmt = (v: number, d = 1) => (Number.isFinite(v) ? v.toFixed(d) : "—");
const parseNum = (s: string): number | null => (s.trim() === "" ? null : Number(s.replace(",", ".")));
const numText = (v: number | null) => (v === null ? "" : String(v));
/** Shown to two decimals; the stored value stays exact (refExact) until the person edits the field. */
const REF_DIGITS = 2;

export function MarkingEditor(props: {
  photo: { id: string; width: number; height: number; name: string; lightingProfileId: string | null };
  displayUrl: string;
  dyes: DyeOption[];
  solvents: SolventOption[];
  profiles: ProfileOption[];
  templates: TemplateOption[];
  patches: PatchOption[];
  panels: PanelOption[];
  checkStandards: CheckStandardOption[];
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
  const [panelChoice, setPanelChoice] = useState(props.panels[0]?.id ?? "");
  const [panelName, setPanelName] = useState("");
  const [sameDye, setSameDye] = useState("");
  const [openRow, setOpenRow] = useState<string | null>(null);
  // The last replicate check and the vials' inputs it answered; shown until the next answer, but saving waits for a current one.
  const [replicateCheck, setReplicateCheck] = useState<{ forKey: string | null; vials: Record<string, Replicate> }>({ forKey: null, vials: {} });
  const replicates = replicateCheck.vials;
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
  const [panelState, panelAction, panelSaving] = useActionState(savePanelAction, null);
  const [panelDelState, panelDelAction] = useActionState(deletePanelAction, null);

  const scale = (fit * zoom) / W; // CSS px per photo px
  const handle = 18 / scale;
  const vials = marks.filter((m) => m.role === "vial");
  const refs = marks.filter((m) => m.role === "reference");
  const checks = marks.filter((m) => m.role === "check");
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
      label: `${ROLE_NAME[role]} ${sameRole + 1}`,
      dyeId: sameDye || base?.dyeId || "",
      ...(from ? conditionOf(from) : { ...NEUTRAL, acidBase: base?.acidBase ?? "neutral", ph: base?.ph ?? "", conc: base?.conc ?? "" }),
      flagReason: "",
      refL: from?.refL ?? "",
      refA: from?.refA ?? "",
      refB: from?.refB ?? "",
      refExact: from?.refExact ?? null,
      standardId: from?.standardId ?? "",
    };
  }

  // ------------------------------------------------------------ pointer editing

  const toPhoto = (e: { clientX: number; clientY: number }) => {
    const r = svgRef.current!.getBoundingClientRect();
    return { x: ((e.clientX - r.left) / r.width) * W, y: ((e.clientY - r.top) / r.height) * H };
  };

  const onPointerDown = (e: React.PointerEvent<SVGSVGElement>) => {
    if (e.button !== 0) return;
    // No page scroll, text selection or touch panning may start from a press on the photo: the region
    // must land where the pointer is. Focusing without scrolling keeps the photo where it was.
    e.preventDefault();
    const target = e.target as Element;
    const key = target.getAttribute("data-key");
    const h = target.getAttribute("data-handle");
    const p = toPhoto(e);
    svgRef.current!.setPointerCapture(e.pointerId);
    svgRef.current!.focus({ preventScroll: true });
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
      const m = { ...addMark(box, from.role, from.shape, cur), label: `${ROLE_NAME[from.role]} ${marks.filter((x) => x.role === from.role).length + made.length + 1}` };
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
      return { ...m, label: r.label || (r.role === "vial" ? `Vial ${++vi}` : ROLE_NAME[r.role]) };
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
    else if (e.key === "r") update(sel.key, { role: sel.role === "vial" ? "reference" : sel.role === "reference" && props.checkStandards.length > 0 ? "check" : "vial" });
    else if (e.key === "Escape") setSelected(null);
  };

  // ------------------------------------------------------------ live measurement

  const refLab = (r: Mark): (number | null)[] =>
    (["refL", "refA", "refB"] as const).map((f, i) => (r.refExact && r[f] === r.refExact[i].toFixed(REF_DIGITS) ? r.refExact[i] : parseNum(r[f])));
  const refInputs = refs
    .map((r) => ({ key: r.key, lab: refLab(r), region: { shape: r.shape, x: r.x, y: r.y, w: r.w, h: r.h }, label: r.label }))
    .filter((r) => r.lab.every((v) => v !== null && Number.isFinite(v)));
  // Check standards are measured like vials, through the same correction.
  const measured = [...vials, ...checks];
  const geometry = JSON.stringify([profileId, measured.map((m) => [m.key, m.shape, m.x, m.y, m.w, m.h]), refInputs]);

  useEffect(() => {
    const forKey = geometry;
    if (measured.length === 0 && refInputs.length === 0) {
      setLive({ vials: {}, references: {}, photoFlags: [], busy: false, forKey });
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
            checks: checks.map((m) => ({ key: m.key, region: { shape: m.shape, x: m.x, y: m.y, w: m.w, h: m.h } })),
          }),
        });
        const body = await res.json();
        if (!res.ok) {
          setLive({ vials: {}, references: {}, photoFlags: [], busy: false, error: body.error?.message ?? `The server answered ${res.status}.`, forKey });
          return;
        }
        const refMap: Record<string, RefResult> = {};
        (body.references as RefResult[]).forEach((r, i) => (refMap[refInputs[i].key] = r));
        setLive({
          // Check standards answer beside the vials (or say what is missing before they can be read).
          vials: Object.fromEntries([...(body.vials as ({ key: string } & Live["vials"][string])[]), ...((body.checks ?? []) as ({ key: string } & Live["vials"][string])[])].map((v) => [v.key, v])),
          references: refMap,
          photoFlags: body.photoFlags,
          correction: body.correction.kind,
          busy: false,
          forKey,
        });
      } catch (error) {
        if ((error as Error).name !== "AbortError") setLive((l) => ({ ...l, busy: false, error: "Could not reach the server to measure; check the connection.", forKey }));
      }
    }, 300);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
    // geometry captures every input of the measurement.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [geometry, photo.id]);

  // ------------------------------------------------------------ replicates (live)

  const conditionPayload = (v: ConditionPart) => ({
    additive: v.additive.trim(),
    additiveConcentrationMolL: parseNum(v.addConc),
    temperatureC: parseNum(v.temp),
    pathLengthMm: parseNum(v.path),
    secondSolventId: v.solvent2 || null,
    secondSolventMoleFraction: v.solvent2 ? parseNum(v.x2) : null,
  });
  const replicateInputs = vials
    .filter((v) => v.dyeId && v.solventId && live.vials[v.key]?.ok)
    .map((v) => {
      const r = live.vials[v.key] as { ok: true; colour: Colour };
      return { key: v.key, dyeId: v.dyeId, solventId: v.solventId, acidBase: v.acidBase, ph: parseNum(v.ph), concentrationUmolL: parseNum(v.conc), ...conditionPayload(v), lab: r.colour.lab, uncertaintyDeltaE00: r.colour.uncertainty?.uDeltaE00 ?? null };
    })
    .filter((v) => [v.ph, v.concentrationUmolL, v.additiveConcentrationMolL, v.temperatureC, v.pathLengthMm, v.secondSolventMoleFraction].every((n) => n === null || Number.isFinite(n)));
  const replicateKey = JSON.stringify(replicateInputs);

  useEffect(() => {
    const forKey = replicateKey;
    if (replicateInputs.length === 0) {
      setReplicateCheck({ forKey, vials: {} });
      return;
    }
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      try {
        const res = await fetch("/api/bench/replicates", { method: "POST", headers: { "content-type": "application/json" }, signal: controller.signal, body: JSON.stringify({ vials: replicateInputs }) });
        // The check is advisory while marking (saving runs it again and refuses what it must): a refusal settles it with no flags.
        const body = res.ok ? ((await res.json()) as { vials: ({ key: string } & Replicate)[] }) : { vials: [] };
        setReplicateCheck({ forKey, vials: Object.fromEntries(body.vials.map((v) => [v.key, v])) });
      } catch (error) {
        // Offline: settled with no flags; the save runs the check again. Aborted: a newer check follows.
        if ((error as Error).name !== "AbortError") setReplicateCheck({ forKey, vials: {} });
      }
    }, 250);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
    // replicateKey captures every input of the check.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [replicateKey]);

  // ------------------------------------------------------------ panels

  function applyPanel(id: string) {
    const panel = props.panels.find((p) => p.id === id);
    if (!panel) return;
    if (vials.length === 0) return setNote("Mark the vials first; the panel then fills them from left to right.");
    const order = [...vials].sort((a, b) => a.x - b.x || a.y - b.y);
    const byKey = new Map(
      order.slice(0, panel.entries.length).map((v, i) => {
        const e = panel.entries[i];
        const part: ConditionPart = {
          solventId: e.solventId,
          acidBase: e.acidBase,
          ph: numText(e.ph),
          conc: numText(e.concentrationUmolL ?? null),
          additive: e.additive,
          addConc: numText(e.additiveConcentrationMolL),
          temp: numText(e.temperatureC),
          path: numText(e.pathLengthMm),
          solvent2: e.secondSolventId ?? "",
          x2: numText(e.secondSolventMoleFraction),
        };
        return [v.key, part];
      }),
    );
    setMarks((all) => all.map((m) => (byKey.has(m.key) ? { ...m, ...byKey.get(m.key)! } : m)));
    const n = Math.min(order.length, panel.entries.length);
    setNote(
      `Applied the panel “${panel.name}” to ${n} vial${n === 1 ? "" : "s"} from left to right.` +
        (order.length > panel.entries.length ? ` ${order.length - panel.entries.length} vial${order.length - panel.entries.length === 1 ? " is" : "s are"} right of the panel's last place: give ${order.length - panel.entries.length === 1 ? "it" : "them"} a solvent.` : "") +
        (order.length < panel.entries.length ? ` The panel has ${panel.entries.length} places; the last ${panel.entries.length - order.length} found no vial.` : ""),
    );
  }

  const panelPayload = JSON.stringify({
    name: panelName,
    entries: [...vials]
      .sort((a, b) => a.x - b.x || a.y - b.y)
      .map((v) => ({ solventId: v.solventId, acidBase: v.acidBase, ph: parseNum(v.ph), concentrationUmolL: parseNum(v.conc), ...conditionPayload(v) })),
  });

  // ------------------------------------------------------------ saving

  const flagsOf = (v: Mark): string[] => {
    const r = live.vials[v.key];
    if (!r?.ok) return [];
    const extra = replicates[v.key]?.flags ?? [];
    return [...r.colour.flags, ...extra.filter((f) => !r.colour.flags.includes(f))];
  };
  const problems: string[] = [];
  if (vials.length === 0 && checks.length === 0) problems.push("Mark at least one vial, or a check standard to check the light.");
  // A check standard is read through the light correction: without one its ΔE00 would say nothing (lib/bench/checks.ts).
  const checkNeeds = checks.length > 0 ? checkStandardRefusal({ lightingProfileId: profileId || null, referenceCount: refInputs.length }) : null;
  if (checkNeeds) problems.push(checkNeeds);
  for (const r of refs) if (!refInputs.some((x) => x.key === r.key)) problems.push(`${r.label} needs its known L*, a*, b* (from the tile's certificate).`);
  for (const v of vials) {
    if (!v.dyeId) problems.push(`${v.label} needs a dye.`);
    if (!v.solventId) problems.push(`${v.label} needs a solvent.`);
    const ph = parseNum(v.ph);
    if (ph !== null && !(ph >= -2 && ph <= 16)) problems.push(`${v.label}: pH must be between −2 and 16.`);
    const c = parseNum(v.conc);
    if (c !== null && !(c > 0)) problems.push(`${v.label}: the concentration must be a positive number of µmol/L.`);
    const t = parseNum(v.temp);
    if (t !== null && !(t >= -100 && t <= 250)) problems.push(`${v.label}: the temperature must be between −100 and 250 °C.`);
    const pl = parseNum(v.path);
    if (pl !== null && !(pl > 0 && pl <= 1000)) problems.push(`${v.label}: the path length must be a positive number of mm.`);
    const ac = parseNum(v.addConc);
    if (ac !== null && !(ac >= 0 && ac <= 20)) problems.push(`${v.label}: the amount of acid or base must be between 0 and 20 mol/L.`);
    if (ac !== null && !v.additive.trim()) problems.push(`${v.label}: name the acid or base whose amount you gave (e.g. HCl).`);
    if (v.solvent2) {
      const x = parseNum(v.x2);
      if (x === null || !(x > 0 && x < 1)) problems.push(`${v.label}: give the second solvent's mole fraction, between 0 and 1.`);
      if (v.solvent2 === v.solventId) problems.push(`${v.label}: the second solvent must differ from the first.`);
    }
    const r = live.vials[v.key];
    if (r && !r.ok) problems.push(`${v.label}: ${r.error}`);
    if (r?.ok && flagsOf(v).length > 0 && !v.flagReason.trim()) problems.push(`${v.label} is flagged; say why it should be kept, or re-mark it.`);
  }
  // Saving waits until the colours and the replicate flags shown belong to the regions and inputs as they are now:
  // a stale answer (debounce pending, request in flight) could hide a flag that needs its reason.
  const measuring = live.busy || live.forKey !== geometry;
  const checkingReplicates = replicateCheck.forKey !== replicateKey;
  for (const c of checks) {
    if (!c.standardId) problems.push(`${c.label} needs its registered check standard, or remove it.`);
    const r = live.vials[c.key];
    if (r && !r.ok && !checkNeeds) problems.push(`${c.label}: ${r.error}`);
  }
  const measuredAll = measured.every((v) => live.vials[v.key]?.ok) && !measuring && !checkingReplicates;

  const payload = JSON.stringify({
    photoId: photo.id,
    lightingProfileId: profileId || null,
    references: refInputs.map((r) => ({ region: r.region, lab: r.lab, label: r.label })),
    checkStandards: checks.map((c) => ({ region: { shape: c.shape, x: c.x, y: c.y, w: c.w, h: c.h }, standardId: c.standardId })),
    vials: vials.map((v) => ({
      region: { shape: v.shape, x: v.x, y: v.y, w: v.w, h: v.h },
      dyeId: v.dyeId,
      solventId: v.solventId,
      acidBase: v.acidBase,
      ph: parseNum(v.ph),
      concentrationUmolL: parseNum(v.conc),
      ...conditionPayload(v),
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
    if (tplState?.ok || delState?.ok || panelState?.ok || panelDelState?.ok) router.refresh();
  }, [tplState, delState, panelState, panelDelState, router]);

  const inUse = useMemo(() => {
    const ids = new Set(vials.map((v) => v.solventId).filter(Boolean));
    return props.solvents.filter((s) => ids.has(s.id)).map((s) => ({ name: s.name, cautions: s.cautions || "Read the supplier's safety data sheet before use." }));
  }, [vials, props.solvents]);

  const byMedium = (["protic", "dipolar-aprotic", "nonpolar"] as const).map((m) => ({ medium: m, list: props.solvents.filter((s) => s.medium === m) }));
  const fieldErr = (i: number, f: string) => (saveState && !saveState.ok ? saveState.fieldErrors?.[`vials.${i}.${f}`]?.join(" ") : undefined);

  const solventName = (id: string) => props.solvents.find((s) => s.id === id)?.name ?? "";
  const solventOptions = (placeholder: string) => (
    <>
      <option value="">{placeholder}</option>
      {byMedium.map((g) => (
        <optgroup key={g.medium} label={MEDIUM_LABEL[g.medium]}>
          {g.list.map((s) => (
            <option key={s.id} value={s.id}>
              {s.name} — {MEDIUM_LABEL[s.medium]}
            </option>
          ))}
        </optgroup>
      ))}
    </>
  );
  const conditionSummary = (v: Mark) =>
    [
      v.acidBase,
      v.ph.trim() && `pH ${v.ph}`,
      v.additive.trim() && `${v.additive}${v.addConc.trim() ? ` ${v.addConc} mol/L` : ""}`,
      v.temp.trim() && `${v.temp} °C`,
      v.path.trim() && `${v.path} mm`,
      v.solvent2 && `+ ${solventName(v.solvent2)} x₂ ${v.x2 || "?"}`,
      v.conc.trim() && `${v.conc} µmol/L`,
    ]
      .filter(Boolean)
      .join(", ");
  const INPUT = "min-h-10 w-full rounded-md border border-line bg-white px-2 text-sm";
  const SMALL_LABEL = "block text-xs font-semibold text-ink-soft";
  const BUTTON = "min-h-10 rounded-md border border-line bg-white px-3 text-sm font-semibold disabled:opacity-40";
  const orderedVials = [...vials].sort((a, b) => a.x - b.x || a.y - b.y);

  // ------------------------------------------------------------ render

  return (
    <div className="space-y-3" data-testid="marking-editor" data-busy={measuring || checkingReplicates ? "true" : "false"}>
      <p className="rounded-lg border border-line bg-white p-4 text-sm md:hidden" data-testid="editor-needs-width">
        Marking a rack needs a screen at least 768 px wide: each vial&apos;s region is drawn on the photo and checked against its row in the table beside it, and on a phone the regions
        are too small to place within a few pixels. Open this page on a tablet or a computer; the review queue and the measurements work on a phone.
      </p>
      <div className="hidden space-y-3 md:block">
        <SafetyNotice solvents={inUse} />
        {/* From 1280 px the table column keeps the 46rem its fixed columns need; the photo takes the rest. */}
        <div className="grid items-start gap-4 lg:grid-cols-[minmax(0,2fr)_minmax(0,3fr)] xl:grid-cols-[minmax(0,1fr)_minmax(46rem,1.6fr)]">
          {/* The photo column stays in view while the table beside it scrolls. */}
          <div className="space-y-2 lg:sticky lg:top-20" data-testid="photo-column">
            <div className="flex flex-wrap items-end gap-2 rounded-lg border border-line bg-white p-2">
              <div>
                <label htmlFor="profile" className={SMALL_LABEL}>
                  Lighting profile of this photo
                </label>
                <select id="profile" value={profileId} onChange={(e) => setProfileId(e.target.value)} className={`${INPUT} w-auto`}>
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
                <legend className={SMALL_LABEL}>New region</legend>
                {(["vial", "reference", "check"] as const).map((r) => (
                  <button
                    key={r}
                    type="button"
                    aria-pressed={newRole === r}
                    onClick={() => setNewRole(r)}
                    disabled={r === "check" && props.checkStandards.length === 0}
                    title={r === "check" ? (props.checkStandards.length === 0 ? "No check standard is registered yet; an admin registers them on the Lighting page." : "A vial or tile of known colour, registered on the Lighting page") : undefined}
                    className={`${BUTTON} ${newRole === r ? "border-accent bg-accent-soft text-accent" : ""}`}
                  >
                    {r === "check" ? "Check standard" : ROLE_NAME[r]}
                  </button>
                ))}
                {(["rect", "ellipse"] as const).map((s) => (
                  <button key={s} type="button" aria-pressed={newShape === s} onClick={() => setNewShape(s)} className={`${BUTTON} ${newShape === s ? "border-accent bg-accent-soft text-accent" : ""}`}>
                    {s === "rect" ? "Rectangle" : "Ellipse"}
                  </button>
                ))}
              </fieldset>
              {props.checkStandards.length === 0 && <p className="w-full text-xs text-ink-soft">Check standard: none registered yet; an admin registers them on the Lighting page.</p>}
              <div className="flex items-center gap-1">
                <button type="button" onClick={() => setZoom((z) => ZOOMS[Math.max(ZOOMS.indexOf(z) - 1, 0)])} className={`${BUTTON} min-w-10 px-0 text-lg`} aria-label="Zoom out">
                  −
                </button>
                <span className="w-12 text-center text-sm tabular-nums" aria-live="polite">
                  {Math.round(zoom * 100)} %
                </span>
                <button type="button" onClick={() => setZoom((z) => ZOOMS[Math.min(ZOOMS.indexOf(z) + 1, ZOOMS.length - 1)])} className={`${BUTTON} min-w-10 px-0 text-lg`} aria-label="Zoom in">
                  +
                </button>
              </div>
            </div>
            <div ref={wrapRef} className="max-h-[62vh] overflow-auto overscroll-contain rounded-lg border border-line bg-[#1b1f27]">
              <div className="relative" style={{ width: fit * zoom, height: fit * zoom * (H / W) }}>
                {/* eslint-disable-next-line @next/next/no-img-element */}
                <img src={props.displayUrl} alt={`Rack photo ${photo.name}`} draggable={false} className="absolute inset-0 h-full w-full select-none" />
                <svg
                  ref={svgRef}
                  data-testid="marking-canvas"
                  data-ready={ready ? "true" : undefined}
                  viewBox={`0 0 ${W} ${H}`}
                  preserveAspectRatio="none"
                  className="absolute inset-0 h-full w-full cursor-crosshair touch-none select-none focus:outline-none focus-visible:ring-4 focus-visible:ring-accent/50"
                  style={{ touchAction: "none" }}
                  tabIndex={0}
                  role="application"
                  aria-label="Photo: drag on it to mark a region. Arrow keys move the selected region (Shift: 10 px, Alt: resize); D duplicates it along the rack; E switches rectangle/ellipse; R switches vial/reference/check standard; N and P select the next or previous region; Delete removes it; + and − zoom."
                  onPointerDown={onPointerDown}
                  onPointerMove={onPointerMove}
                  onPointerUp={onPointerUp}
                  onPointerCancel={onPointerUp}
                  onKeyDown={onKeyDown}
                >
                  {marks.map((m) => {
                    const isSel = m.key === selected;
                    const flagged = m.role === "vial" && flagsOf(m).length > 0;
                    const colour = m.role === "reference" ? "#ffffff" : m.role === "check" ? "#c4b5fd" : flagged ? "#f59e0b" : "#5eead4";
                    const common = { "data-key": m.key, fill: isSel ? "rgba(255,255,255,0.12)" : "rgba(255,255,255,0.02)", stroke: colour, strokeWidth: isSel ? 3 : 2, vectorEffect: "non-scaling-stroke" as const, strokeDasharray: m.role === "reference" ? "6 4" : m.role === "check" ? "2 3" : undefined, className: "cursor-move" };
                    // Labels sit above the region, or inside it when the region touches the photo's top edge;
                    // near the right edge they end at the region's right side, so none is cut off.
                    const fontSize = 13 / scale;
                    const above = m.y - 6 / scale - fontSize > 0;
                    const rightAligned = m.x + (m.label.length * 7.5) / scale > W;
                    return (
                      <g key={m.key} data-testid="region" data-label={m.label}>
                        {m.shape === "rect" ? <rect x={m.x} y={m.y} width={m.w} height={m.h} {...common} /> : <ellipse cx={m.x + m.w / 2} cy={m.y + m.h / 2} rx={m.w / 2} ry={m.h / 2} {...common} />}
                        <text
                          data-testid="region-label"
                          x={rightAligned ? m.x + m.w - 2 / scale : m.x + 2 / scale}
                          y={above ? m.y - 6 / scale : m.y + fontSize + 4 / scale}
                          textAnchor={rightAligned ? "end" : "start"}
                          fontSize={fontSize}
                          fill={colour}
                          stroke="#111827"
                          strokeWidth={3}
                          paintOrder="stroke"
                          vectorEffect="non-scaling-stroke"
                          style={{ pointerEvents: "none", fontWeight: 600 }}
                        >
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
            <div className="flex flex-wrap items-center gap-1">
              <button
                type="button"
                onClick={() => {
                  const m = addMark({ x: W * 0.45, y: H * 0.35, w: Math.max(8, W * 0.08), h: Math.max(8, H * 0.3) }, newRole, newShape);
                  setMarks((all) => [...all, m]);
                  setSelected(m.key);
                  svgRef.current?.focus({ preventScroll: true });
                }}
                className={BUTTON}
              >
                Add a region
              </button>
              <button type="button" onClick={() => duplicateAlongRack()} disabled={marks.length === 0} className={BUTTON}>
                Duplicate along the rack
              </button>
              <label htmlFor="dup-count" className="sr-only">
                How many copies
              </label>
              <select id="dup-count" value={dupCount} onChange={(e) => setDupCount(Number(e.target.value))} className={`${INPUT} w-auto`}>
                {[1, 2, 3, 4, 5, 6, 7, 8, 11].map((n) => (
                  <option key={n} value={n}>
                    ×{n}
                  </option>
                ))}
              </select>
              <button type="button" onClick={renumber} disabled={vials.length < 2} className={BUTTON}>
                Number left to right
              </button>
            </div>
            {note && (
              <p role="status" className="text-sm text-ink-soft">
                {note}
              </p>
            )}
            <p className="text-xs text-ink-soft">
              {W}×{H} px after EXIF orientation. Drag on the photo to mark; drag a region to move it, a corner to resize. With the photo focused: arrows move (Shift ×10, Alt
              resizes), D duplicates along the rack, E ellipse/rectangle, R vial/reference/check, N/P next/previous, Delete removes, +/− zoom. Swatches are screen approximations; the numbers
              are the measurement.
            </p>
          </div>

          <div className="min-w-0 space-y-3">
            <section aria-label="Whole rack" className="grid gap-3 rounded-lg border border-line bg-white p-3 xl:grid-cols-2">
              <div>
                <label htmlFor="panel-choice" className={SMALL_LABEL}>
                  Solvent panel (left to right)
                </label>
                <div className="flex gap-1">
                  <select id="panel-choice" value={panelChoice} onChange={(e) => setPanelChoice(e.target.value)} className={INPUT}>
                    {props.panels.length === 0 && <option value="">No saved panels yet</option>}
                    {props.panels.map((p) => (
                      <option key={p.id} value={p.id}>
                        {p.name} ({p.entries.length} solvents)
                      </option>
                    ))}
                  </select>
                  <button type="button" disabled={!panelChoice || vials.length === 0} onClick={() => applyPanel(panelChoice)} className={BUTTON}>
                    Apply panel
                  </button>
                </div>
              </div>
              <DyePicker
                dyes={props.dyes}
                value={sameDye}
                onChange={(id) => {
                  setSameDye(id);
                  setMarks((all) => all.map((x) => (x.role === "vial" ? { ...x, dyeId: id } : x)));
                }}
                label="Same dye for every vial"
              />
            </section>

            <div className="rounded-lg border border-line bg-white" aria-live="polite">
              <p className="border-b border-line px-3 py-2 text-sm">
                <strong>
                  {vials.length} vial{vials.length === 1 ? "" : "s"}, {refs.length} reference{refs.length === 1 ? "" : "s"}
                  {checks.length > 0 ? `, ${checks.length} check standard${checks.length === 1 ? "" : "s"}` : ""}
                </strong>
                {measuring ? " · measuring…" : checkingReplicates ? " · checking replicates…" : ""} ·{" "}
                <span className="text-ink-soft">
                  {live.correction === "none" || !live.correction
                    ? "No light correction: choose a profile or mark a white/grey reference of known Lab."
                    : `Correction: ${profileId ? "profile" : ""}${profileId && refInputs.length ? " + " : ""}${refInputs.length ? "in-photo reference scaling" : ""} (${live.correction}).`}
                </span>
                {live.photoFlags.includes("white-card-only") && (
                  <span className="block text-warn" data-testid="white-card-only">
                    White card only: no lighting profile stands behind these colours; expect a few ΔE00 (practitioner estimate).
                  </span>
                )}
                {live.error && (
                  <span role="alert" className="block text-bad">
                    {live.error}
                  </span>
                )}
              </p>
              <div className="overflow-x-auto">
                <table className="w-full min-w-[46rem] table-fixed text-sm" data-testid="rack-table">
                  <caption className="sr-only">One row per vial, left to right: its region, dye, solvent, condition, measured colour, uncertainty and flags.</caption>
                  <thead className="bg-paper/60 text-left text-xs text-ink-soft">
                    <tr>
                      {/* Fixed widths for the short columns; dye and solvent share what is left. */}
                      <th scope="col" className="w-[4.5rem] px-2 py-1.5">Vial</th>
                      <th scope="col" className="px-2 py-1.5">Dye</th>
                      <th scope="col" className="px-2 py-1.5">Solvent</th>
                      <th scope="col" className="w-[6.5rem] px-2 py-1.5">Condition</th>
                      <th scope="col" className="w-[7rem] px-2 py-1.5">Colour (CIELAB D65)</th>
                      <th scope="col" className="w-16 whitespace-nowrap px-2 py-1.5">± ΔE00</th>
                      <th scope="col" className="w-[7.5rem] px-2 py-1.5">Flags</th>
                    </tr>
                  </thead>
                  {orderedVials.length === 0 && (
                    <tbody>
                      <tr>
                        <td colSpan={7} className="px-3 py-4 text-ink-soft">
                          Drag on the photo inside each vial, or apply a saved rack layout below.
                        </td>
                      </tr>
                    </tbody>
                  )}
                  {orderedVials.map((m) => {
                    const vi = vials.indexOf(m);
                    const r = live.vials[m.key];
                    const rep = replicates[m.key];
                    const flags = flagsOf(m);
                    const isSel = m.key === selected;
                    const open = openRow === m.key;
                    return (
                      <tbody key={m.key} data-testid="vial-row" data-label={m.label} data-flags={flags.join(" ")} onFocusCapture={() => setSelected(m.key)} className={`border-t border-line ${isSel ? "bg-accent-soft/40" : ""}`}>
                        <tr className="align-top">
                          <td className="px-2 py-1.5">
                            <button type="button" onClick={() => setSelected(m.key)} className="min-h-10 text-left font-semibold" aria-label={`Select ${m.label} on the photo`}>
                              {m.label}
                            </button>
                            <span className="block text-xs text-ink-soft tabular-nums">
                              {m.shape === "rect" ? "rect." : "ellipse"} {m.w}×{m.h} px
                            </span>
                            <button type="button" aria-label={`Remove ${m.label}`} onClick={() => setMarks((all) => all.filter((x) => x.key !== m.key))} className="text-xs font-semibold text-bad underline">
                              remove
                            </button>
                          </td>
                          <td className="px-2 py-1.5">
                            <DyePicker dyes={props.dyes} value={m.dyeId} onChange={(id) => update(m.key, { dyeId: id })} label={`Dye in ${m.label}`} hideLabel />
                            {fieldErr(vi, "dyeId") && <p className="text-xs text-bad">{fieldErr(vi, "dyeId")}</p>}
                          </td>
                          <td className="px-2 py-1.5">
                            <select aria-label={`Solvent in ${m.label}`} value={m.solventId} onChange={(e) => update(m.key, { solventId: e.target.value })} className={INPUT}>
                              {solventOptions("Choose the solvent")}
                            </select>
                            {fieldErr(vi, "solventId") && <p className="text-xs text-bad">{fieldErr(vi, "solventId")}</p>}
                          </td>
                          <td className="px-2 py-1.5">
                            <select aria-label={`Acid or base in ${m.label}`} value={m.acidBase} onChange={(e) => update(m.key, { acidBase: e.target.value as Mark["acidBase"] })} className={INPUT}>
                              <option value="acid">acid</option>
                              <option value="neutral">neutral</option>
                              <option value="base">base</option>
                            </select>
                            <button type="button" aria-expanded={open} aria-controls={`more-${m.key}`} onClick={() => setOpenRow(openRow === m.key ? null : m.key)} className="mt-0.5 block text-left text-xs font-semibold text-accent underline">
                              {conditionSummary(m) === m.acidBase ? "pH, additive, T, blend…" : conditionSummary(m).replace(`${m.acidBase}, `, "")}
                            </button>
                          </td>
                          <td className="px-2 py-1.5" data-testid="live-colour">
                            {r?.ok ? (
                              <div className="flex items-start gap-1.5">
                                <span role="img" aria-label={`Measured colour of ${m.label} (screen approximation)`} className="h-6 w-6 shrink-0 rounded border border-black/10" style={{ backgroundColor: r.colour.hex }} />
                                <span className="whitespace-nowrap text-xs leading-4 tabular-nums" data-testid="live-lab" title={`C* ${fmt(r.colour.lch[1])} h° ${fmt(r.colour.lch[2], 0)} · ${r.colour.pixels} px, ${r.colour.rejected} rejected`}>
                                  L* {fmt(r.colour.lab[0])}
                                  <br />
                                  a* {fmt(r.colour.lab[1])}
                                  <br />
                                  b* {fmt(r.colour.lab[2])}
                                </span>
                              </div>
                            ) : r ? (
                              <p className="text-xs text-bad">{r.error}</p>
                            ) : (
                              <span className="text-xs text-ink-soft">{live.busy ? "measuring…" : "—"}</span>
                            )}
                          </td>
                          <td className="px-2 py-1.5 text-xs tabular-nums" data-testid="live-uncertainty">
                            {r?.ok && r.colour.uncertainty ? `± ${fmt(r.colour.uncertainty.uDeltaE00, 2)}` : "—"}
                          </td>
                          <td className="px-2 py-1.5">
                            {flags.length === 0 ? (
                              <span className="text-xs text-ink-soft">{r?.ok ? "none" : ""}</span>
                            ) : (
                              <FlagBadges flags={flags} size="short" label={`Quality flags of ${m.label}`} />
                            )}
                          </td>
                        </tr>
                        {open && (
                          <tr id={`more-${m.key}`}>
                            <td colSpan={7} className="px-2 pb-2">
                              <div className="grid grid-cols-2 gap-2 rounded-md bg-paper/60 p-2 sm:grid-cols-4">
                                {(
                                  [
                                    ["ph", "pH", "e.g. 7.4"],
                                    ["additive", "Acid or base added", "e.g. HCl"],
                                    ["addConc", "Its amount, mol/L", "e.g. 0.03"],
                                    ["temp", "Temperature, °C", "e.g. 23"],
                                    ["path", "Path length, mm", "e.g. 10"],
                                    ["conc", "Dye, µmol/L", "e.g. 20"],
                                  ] as const
                                ).map(([f, label, hint]) => (
                                  <div key={f}>
                                    <label htmlFor={`${f}-${m.key}`} className={SMALL_LABEL}>
                                      {label}
                                    </label>
                                    <input id={`${f}-${m.key}`} aria-label={`${label} in ${m.label}`} inputMode={f === "additive" ? "text" : "decimal"} placeholder={hint} value={m[f]} onChange={(e) => update(m.key, { [f]: e.target.value })} className={INPUT} />
                                  </div>
                                ))}
                                <div className="col-span-2">
                                  <label htmlFor={`s2-${m.key}`} className={SMALL_LABEL}>
                                    Second solvent (blend)
                                  </label>
                                  <select id={`s2-${m.key}`} value={m.solvent2} onChange={(e) => update(m.key, { solvent2: e.target.value })} className={INPUT}>
                                    {solventOptions("None (neat solvent)")}
                                  </select>
                                </div>
                                <div>
                                  <label htmlFor={`x2-${m.key}`} className={SMALL_LABEL}>
                                    Its mole fraction x₂
                                  </label>
                                  <input id={`x2-${m.key}`} inputMode="decimal" placeholder="0–1" disabled={!m.solvent2} value={m.x2} onChange={(e) => update(m.key, { x2: e.target.value })} className={INPUT} />
                                </div>
                                <div className="flex items-end">
                                  <button
                                    type="button"
                                    onClick={() => setMarks((all) => all.map((x) => (x.role === "vial" && x.key !== m.key ? { ...x, ...conditionOf(m), solventId: x.solventId } : x)))}
                                    className="text-xs font-semibold text-accent underline"
                                  >
                                    Same condition in every vial (solvents kept)
                                  </button>
                                </div>
                              </div>
                            </td>
                          </tr>
                        )}
                        {(flags.length > 0 || (rep && rep.earlier.length > 0)) && (
                          <tr>
                            <td colSpan={7} className="px-2 pb-2">
                              {flags.length > 0 && <p className="text-xs text-warn">{m.label}: {flags.map((f) => flagWords(f).long).join("; ")}.</p>}
                              {rep && rep.earlier.length > 0 && (
                                <div className="mt-1 flex flex-wrap items-center gap-1.5 text-xs" data-testid="replicate-check">
                                  <span className={rep.verdict?.disagrees ? "font-semibold text-warn" : "text-ink-soft"}>
                                    {rep.verdict?.disagrees ? "Disagrees with" : "Agrees with"} {rep.earlier.length} earlier accepted colour{rep.earlier.length === 1 ? "" : "s"} of this dye and condition: ΔE00{" "}
                                    {fmt(rep.verdict!.deltaE00, 1)} from their mean, limit {fmt(rep.verdict!.limitDeltaE00, 1)} (3 × combined spread; common practice)
                                  </span>
                                  {rep.earlier.slice(-8).map((e) => (
                                    <span key={e.id} role="img" aria-label={`Earlier accepted: L* ${fmt(e.lab[0])} a* ${fmt(e.lab[1])} b* ${fmt(e.lab[2])}`} title={`L* ${fmt(e.lab[0])} a* ${fmt(e.lab[1])} b* ${fmt(e.lab[2])}`} className="h-6 w-6 rounded border border-black/10" style={{ backgroundColor: e.hex }} />
                                  ))}
                                  {r?.ok && <span role="img" aria-label={`This vial: L* ${fmt(r.colour.lab[0])}`} className="h-6 w-6 rounded border-2 border-ink" style={{ backgroundColor: r.colour.hex }} />}
                                </div>
                              )}
                              {flags.length > 0 && (
                                <div className="mt-1 flex items-center gap-2">
                                  <label htmlFor={`reason-${m.key}`} className="shrink-0 text-xs font-semibold">
                                    Why keep {m.label}?
                                  </label>
                                  <input id={`reason-${m.key}`} aria-label={`Why keep this flagged measurement? (${m.label})`} value={m.flagReason} onChange={(e) => update(m.key, { flagReason: e.target.value })} className={`${INPUT} min-h-8`} />
                                  {fieldErr(vi, "flagReason") && <p className="text-xs text-bad">{fieldErr(vi, "flagReason")}</p>}
                                </div>
                              )}
                            </td>
                          </tr>
                        )}
                      </tbody>
                    );
                  })}
                </table>
              </div>
            </div>

            {checks.length > 0 && (
              <section aria-label="Check standards" className="space-y-2 rounded-lg border border-line bg-white p-3">
                <h2 className="text-sm font-semibold">Check standards: sealed vials or tiles of known colour, registered on the Lighting page</h2>
                <p className="text-xs text-ink-soft">
                  Measured through the same correction as the vials; on saving, each one&apos;s ΔE00 to its known value is added to the lighting profile&apos;s check history (the lab&apos;s real accuracy).
                </p>
                {checks.map((m) => {
                  const standard = props.checkStandards.find((c) => c.id === m.standardId);
                  const r = live.vials[m.key];
                  // Compared under the standard's own white point, as the save records it (db/queries/lighting.ts).
                  const seen = r?.ok && standard ? (standard.whitePoint === "D50" ? labD65ToLabD50(r.colour.lab as Lab) : (r.colour.lab as Lab)) : null;
                  return (
                    <div key={m.key} data-testid="check-card" data-label={m.label} onFocusCapture={() => setSelected(m.key)} className="grid items-end gap-2 border-t border-line pt-2 sm:grid-cols-[auto_1fr_auto]">
                      <p className="text-sm font-semibold">{m.label}</p>
                      <div>
                        <label htmlFor={`standard-${m.key}`} className={SMALL_LABEL}>
                          Check standard in {m.label}
                        </label>
                        <select id={`standard-${m.key}`} value={m.standardId} onChange={(e) => update(m.key, { standardId: e.target.value })} className={INPUT}>
                          <option value="">Choose the registered standard</option>
                          {props.checkStandards.map((c) => (
                            <option key={c.id} value={c.id}>
                              {c.name} ({c.kind}; L* {fmt(c.lab[0], 2)}, a* {fmt(c.lab[1], 2)}, b* {fmt(c.lab[2], 2)}, {c.whitePoint})
                            </option>
                          ))}
                        </select>
                      </div>
                      <button type="button" aria-label={`Remove ${m.label}`} onClick={() => setMarks((all) => all.filter((x) => x.key !== m.key))} className={`${BUTTON} text-bad`}>
                        ✕
                      </button>
                      {checkNeeds ? (
                        <p className="text-xs text-warn sm:col-span-3" data-testid="check-needs-correction">
                          {checkNeeds}
                        </p>
                      ) : (
                        r && !r.ok && <p className="text-xs text-bad sm:col-span-3">{r.error}</p>
                      )}
                      {seen && standard && (
                        <p className="text-xs text-ink-soft sm:col-span-3" data-testid="check-result">
                          Measured (CIELAB {standard.whitePoint}): L* {fmt(seen[0], 2)} a* {fmt(seen[1], 2)} b* {fmt(seen[2], 2)} · ΔE00 {fmt(deltaE00(seen, standard.lab), 2)} to its known value
                          {r?.ok && r.colour.uncertainty ? ` (measurement ± ${fmt(r.colour.uncertainty.uDeltaE00, 2)} ΔE00)` : ""}
                        </p>
                      )}
                    </div>
                  );
                })}
              </section>
            )}

            {refs.length > 0 && (
              <section aria-label="References" className="space-y-2 rounded-lg border border-line bg-white p-3">
                <h2 className="text-sm font-semibold">References: white or grey patches of known CIELAB (D65) in this photo, from the tile&apos;s certificate</h2>
                {refs.map((m) => {
                  const ref = live.references[m.key];
                  return (
                    <div key={m.key} data-testid="region-card" data-label={m.label} onFocusCapture={() => setSelected(m.key)} className="grid items-end gap-2 border-t border-line pt-2 sm:grid-cols-[auto_1fr_1fr_1fr_auto]">
                      <p className="text-sm font-semibold">{m.label}</p>
                      {(["refL", "refA", "refB"] as const).map((f, i) => (
                        <div key={f}>
                          <label htmlFor={`${f}-${m.key}`} className={SMALL_LABEL}>
                            Known {["L*", "a*", "b*"][i]} of {m.label}
                          </label>
                          <input id={`${f}-${m.key}`} inputMode="decimal" value={m[f]} onChange={(e) => update(m.key, { [f]: e.target.value })} className={INPUT} />
                        </div>
                      ))}
                      <div className="flex gap-1">
                        <button type="button" onClick={() => update(m.key, { role: "vial" })} className={BUTTON}>
                          Make vial
                        </button>
                        <button type="button" aria-label={`Remove ${m.label}`} onClick={() => setMarks((all) => all.filter((x) => x.key !== m.key))} className={`${BUTTON} text-bad`}>
                          ✕
                        </button>
                      </div>
                      {props.patches.length > 0 && (
                        <select
                          aria-label={`Fill ${m.label} from a calibration target`}
                          value=""
                          onChange={(e) => {
                            const p = props.patches[Number(e.target.value)];
                            if (p) update(m.key, { refL: p.lab[0].toFixed(REF_DIGITS), refA: p.lab[1].toFixed(REF_DIGITS), refB: p.lab[2].toFixed(REF_DIGITS), refExact: p.lab });
                          }}
                          className={`${INPUT} sm:col-span-5`}
                        >
                          <option value="">Fill from a calibration target (full precision kept)…</option>
                          {props.patches.map((p, i) => (
                            <option key={i} value={i}>
                              {p.label}
                            </option>
                          ))}
                        </select>
                      )}
                      {ref && (
                        <p className="text-xs text-ink-soft sm:col-span-5" data-testid="reference-result">
                          Seen through the profile: L* {fmt(ref.profileLab[0])} a* {fmt(ref.profileLab[1])} b* {fmt(ref.profileLab[2])} (ΔE00 {fmt(ref.driftDeltaE00, 2)} from its known value)
                          {ref.flags.length ? ` · ${ref.flags.map((f) => flagWords(f).long).join(", ")}` : ""}
                        </p>
                      )}
                    </div>
                  );
                })}
              </section>
            )}

            <form action={saveAction} className="sticky bottom-2 z-10 space-y-2 rounded-lg border border-line bg-white p-3 shadow-md" data-testid="save-bar">
              <input type="hidden" name="payload" value={payload} />
              {problems.length > 0 && (
                <ul className="list-disc pl-5 text-xs text-ink-soft" aria-label="Before saving">
                  {problems.slice(0, 2).map((p, i) => (
                    <li key={i}>{p}</li>
                  ))}
                  {problems.length > 2 && <li>and {problems.length - 2} more: see the rows above.</li>}
                </ul>
              )}
              <button disabled={saving || problems.length > 0 || !measuredAll} className="min-h-11 w-full rounded-md bg-accent px-4 text-base font-semibold text-white disabled:opacity-40">
                {saving
                  ? "Saving…"
                  : vials.length === 0 && checks.length > 0
                    ? `Save ${checks.length} check reading${checks.length === 1 ? "" : "s"}`
                    : `Save ${vials.length} measurement${vials.length === 1 ? "" : "s"}`}
              </button>
              {saveState && (
                <p role={saveState.ok ? "status" : "alert"} className={`text-sm ${saveState.ok ? "text-ok" : "text-bad"}`}>
                  {saveState.message}{" "}
                  {saveState.ok && ((saveState.data?.ids as string[] | undefined)?.length ?? 0) > 0 && (
                    <Link href={`/review?photoId=${photo.id}`} className="font-semibold underline">
                      Open them in the review queue
                    </Link>
                  )}
                </p>
              )}
            </form>

            <details className="rounded-lg border border-line bg-white p-3 text-sm">
              <summary className="cursor-pointer font-semibold">Save or manage rack layouts and solvent panels</summary>
              <div className="mt-3 grid gap-4 xl:grid-cols-2">
                <form action={panelAction} className="space-y-1">
                  <label htmlFor="panel-name" className={SMALL_LABEL}>
                    Save these vials&apos; solvents and conditions (left to right) as a panel
                  </label>
                  <div className="flex gap-1">
                    <input id="panel-name" value={panelName} onChange={(e) => setPanelName(e.target.value)} placeholder="e.g. 8 solvents, polarity ladder" className={INPUT} />
                    <input type="hidden" name="payload" value={panelPayload} />
                    <button disabled={panelSaving || vials.length === 0 || !panelName.trim()} className={BUTTON}>
                      Save panel
                    </button>
                  </div>
                  {panelState && <p className={`text-sm ${panelState.ok ? "text-ok" : "text-bad"}`}>{panelState.message}</p>}
                </form>
                <form action={panelDelAction} className="space-y-1">
                  <p className={SMALL_LABEL}>Delete the panel chosen above</p>
                  <input type="hidden" name="id" value={panelChoice} />
                  <button disabled={!panelChoice} className={`${BUTTON} text-bad`}>
                    Delete panel
                  </button>
                  {panelDelState && !panelDelState.ok && <p className="text-sm text-bad">{panelDelState.message}</p>}
                </form>
                <div className="space-y-1">
                  <label htmlFor="template-choice" className={SMALL_LABEL}>
                    Rack layouts (region positions)
                  </label>
                  <div className="flex gap-1">
                    <select id="template-choice" value={templateChoice} onChange={(e) => setTemplateChoice(e.target.value)} className={INPUT}>
                      {props.templates.length === 0 && <option value="">No saved layouts yet</option>}
                      {props.templates.map((t) => (
                        <option key={t.id} value={t.id}>
                          {t.name} ({t.regions.length} regions)
                        </option>
                      ))}
                    </select>
                    <button type="button" disabled={!templateChoice} onClick={() => applyTemplate(templateChoice)} className={BUTTON}>
                      Apply
                    </button>
                  </div>
                  <form action={delAction}>
                    <input type="hidden" name="id" value={templateChoice} />
                    <button disabled={!templateChoice} className="text-xs font-semibold text-bad underline disabled:opacity-40">
                      Delete this layout
                    </button>
                  </form>
                  {delState && !delState.ok && <p className="text-sm text-bad">{delState.message}</p>}
                </div>
                <form action={tplAction} className="space-y-1">
                  <label htmlFor="template-name" className={SMALL_LABEL}>
                    Save these regions as a layout
                  </label>
                  <div className="flex gap-1">
                    <input id="template-name" value={templateName} onChange={(e) => setTemplateName(e.target.value)} placeholder="e.g. 8-vial rack, light box North" className={INPUT} />
                    <input type="hidden" name="payload" value={templatePayload} />
                    <button disabled={tplSaving || marks.length === 0 || !templateName.trim()} className={BUTTON}>
                      Save layout
                    </button>
                  </div>
                  {tplState && <p className={`text-sm ${tplState.ok ? "text-ok" : "text-bad"}`}>{tplState.message}</p>}
                </form>
              </div>
            </details>
          </div>
        </div>
      </div>
    </div>
  );
}
