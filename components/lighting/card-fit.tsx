"use client";

import { useRouter } from "next/navigation";
import { useRef, useState, useTransition } from "react";
import { fitProfileAction } from "@/app/actions/lighting";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";

type Pt = [number, number];
type Photo = { id: string; width: number; height: number };
const CORNER_NAMES = ["top left", "top right", "bottom right", "bottom left"];

function initialCorners(p: Photo): [Pt, Pt, Pt, Pt] {
  const mx = p.width * 0.2;
  const my = p.height * 0.2;
  return [
    [mx, my],
    [p.width - mx, my],
    [p.width - mx, p.height - my],
    [mx, p.height - my],
  ];
}

/**
 * Upload a card photo (through the same intake as rack photos), drag the grid's four corners onto
 * the outer corners of the card's corner patches, then fit. The server samples the stored photo again.
 * Corners can also be typed (keyboard users, small screens).
 */
export function CardFit({ profileId, rows, columns, photo: initial, corners: initialGrid }: { profileId: string; rows: number; columns: number; photo: Photo | null; corners: [Pt, Pt, Pt, Pt] | null }) {
  const router = useRouter();
  const [photo, setPhoto] = useState<Photo | null>(initial);
  const [corners, setCorners] = useState<[Pt, Pt, Pt, Pt] | null>(initialGrid ?? (initial ? initialCorners(initial) : null));
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [pending, start] = useTransition();
  const svg = useRef<SVGSVGElement>(null);
  const dragging = useRef<number | null>(null);

  async function upload(file: File) {
    setMessage(null);
    const form = new FormData();
    form.append("file", file);
    const res = await fetch("/api/photos", { method: "POST", body: form });
    const body = await res.json().catch(() => ({}));
    if (!res.ok || !body.photo) {
      setMessage({ ok: false, text: body.error?.message ?? "The photo could not be uploaded; try again." });
      return;
    }
    const p = { id: body.photo.id, width: body.photo.width, height: body.photo.height };
    setPhoto(p);
    setCorners(initialCorners(p));
  }

  function toPhoto(e: React.PointerEvent): Pt | null {
    const el = svg.current;
    if (!el || !photo) return null;
    const r = el.getBoundingClientRect();
    return [Math.min(photo.width, Math.max(0, ((e.clientX - r.left) / r.width) * photo.width)), Math.min(photo.height, Math.max(0, ((e.clientY - r.top) / r.height) * photo.height))];
  }

  function move(i: number, p: Pt) {
    setCorners((c) => (c ? (c.map((q, k) => (k === i ? p : q)) as [Pt, Pt, Pt, Pt]) : c));
  }

  function fit() {
    if (!photo || !corners) return;
    start(async () => {
      const form = new FormData();
      form.append("payload", JSON.stringify({ profileId, photoId: photo.id, corners: corners.map(([x, y]) => [Math.round(x), Math.round(y)]) }));
      const res = await fitProfileAction(null, form);
      setMessage({ ok: !!res?.ok, text: res?.message ?? "" });
      if (res?.ok) router.refresh();
    });
  }

  const lines: [Pt, Pt][] = [];
  if (corners) {
    const lerp = (a: Pt, b: Pt, t: number): Pt => [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t];
    const [tl, tr, br, bl] = corners;
    for (let r = 0; r <= rows; r++) lines.push([lerp(tl, bl, r / rows), lerp(tr, br, r / rows)]);
    for (let k = 0; k <= columns; k++) lines.push([lerp(tl, tr, k / columns), lerp(bl, br, k / columns)]);
  }
  const handle = photo ? Math.max(photo.width, photo.height) / 60 : 10;

  return (
    <div className="space-y-3">
      <label className="block text-sm font-medium">
        Card photo
        <input
          type="file"
          accept="image/jpeg,image/png,image/webp,image/tiff"
          className="mt-1 block text-sm"
          data-testid="card-photo-input"
          onChange={(e) => e.target.files?.[0] && upload(e.target.files[0])}
        />
      </label>
      {photo && corners && (
        <>
          <p className="text-sm text-ink-soft">
            Drag the four round handles onto the outer corners of the card&apos;s corner patches ({rows} rows × {columns} columns, read from the top left).
          </p>
          <div className="relative w-full max-w-3xl" style={{ aspectRatio: `${photo.width} / ${photo.height}` }}>
            {/* eslint-disable-next-line @next/next/no-img-element */}
            <img src={`/api/photos/${photo.id}/image?size=display`} alt="Calibration card photo" draggable={false} className="absolute inset-0 h-full w-full select-none" />
            <svg
              ref={svg}
              data-testid="card-grid"
              viewBox={`0 0 ${photo.width} ${photo.height}`}
              className="absolute inset-0 h-full w-full touch-none"
              onPointerMove={(e) => {
                if (dragging.current === null) return;
                const p = toPhoto(e);
                if (p) move(dragging.current, p);
              }}
              onPointerUp={() => (dragging.current = null)}
              onPointerLeave={() => (dragging.current = null)}
            >
              {lines.map(([a, b], i) => (
                <line key={i} x1={a[0]} y1={a[1]} x2={b[0]} y2={b[1]} stroke="#fff" strokeWidth={handle / 5} style={{ mixBlendMode: "difference" }} />
              ))}
              {corners.map(([x, y], i) => (
                <circle
                  key={i}
                  data-testid={`grid-corner-${i}`}
                  cx={x}
                  cy={y}
                  r={handle}
                  fill="rgba(107,47,160,0.6)"
                  stroke="#fff"
                  strokeWidth={handle / 4}
                  className="cursor-move"
                  onPointerDown={(e) => {
                    dragging.current = i;
                    (e.target as Element).setPointerCapture?.(e.pointerId);
                  }}
                  onPointerMove={(e) => {
                    if (dragging.current !== i) return;
                    const p = toPhoto(e);
                    if (p) move(i, p);
                  }}
                  onPointerUp={() => (dragging.current = null)}
                />
              ))}
            </svg>
          </div>
          <fieldset className="grid grid-cols-2 gap-2 text-xs sm:grid-cols-4">
            <legend className="mb-1 text-sm font-medium">Corner positions (photo pixels)</legend>
            {corners.map(([x, y], i) => (
              <label key={i} className="flex flex-col">
                {CORNER_NAMES[i]}
                <span className="flex gap-1">
                  <input aria-label={`${CORNER_NAMES[i]} x`} className="w-20 rounded border border-line px-1" inputMode="numeric" value={Math.round(x)} onChange={(e) => move(i, [Number(e.target.value) || 0, y])} />
                  <input aria-label={`${CORNER_NAMES[i]} y`} className="w-20 rounded border border-line px-1" inputMode="numeric" value={Math.round(y)} onChange={(e) => move(i, [x, Number(e.target.value) || 0])} />
                </span>
              </label>
            ))}
          </fieldset>
          <Button type="button" onClick={fit} disabled={pending} aria-busy={pending}>
            {pending ? "Sampling and fitting…" : "Sample the patches and fit"}
          </Button>
        </>
      )}
      {message && <Notice tone={message.ok ? "ok" : "error"}>{message.text}</Notice>}
    </div>
  );
}
