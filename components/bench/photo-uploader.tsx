"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useCallback, useEffect, useRef, useState } from "react";
import { useDropzone, type FileRejection } from "react-dropzone";

type Item = {
  id: number;
  name: string;
  size: number;
  progress: number;
  status: "waiting" | "uploading" | "done" | "duplicate" | "refused";
  message?: string;
  photoId?: string;
};

const ACCEPT = {
  "image/jpeg": [".jpg", ".jpeg"],
  "image/png": [".png"],
  "image/webp": [".webp"],
  "image/tiff": [".tif", ".tiff"],
};
/** Uploads at once; the server decodes each photo, so more would only queue there. */
const PARALLEL = 3;

function sendPhoto(file: File, lightingProfileId: string, onProgress: (fraction: number) => void): Promise<{ status: number; body: { photo?: { id: string }; duplicate?: boolean; error?: { message: string } } }> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", "/api/photos");
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () => resolve({ status: xhr.status, body: xhr.response ?? { error: { message: "The server sent no answer." } } });
    xhr.onerror = () => resolve({ status: 0, body: { error: { message: "The upload was interrupted (network). Try again." } } });
    const form = new FormData();
    form.append("file", file);
    if (lightingProfileId) form.append("lightingProfileId", lightingProfileId);
    xhr.send(form);
  });
}

function mb(bytes: number) {
  return `${(bytes / 1048576).toFixed(1)} MB`;
}

export function PhotoUploader({ maxBytes, profiles }: { maxBytes: number; profiles: { id: string; name: string }[] }) {
  const router = useRouter();
  const [items, setItems] = useState<Item[]>([]);
  const [profile, setProfile] = useState("");
  const serial = useRef(0);
  // Marks the drop zone as live once React has attached its handlers (tests wait for it).
  const [ready, setReady] = useState(false);
  useEffect(() => setReady(true), []);

  const update = (id: number, patch: Partial<Item>) => setItems((all) => all.map((it) => (it.id === id ? { ...it, ...patch } : it)));

  const onDrop = useCallback(
    async (accepted: File[], rejected: FileRejection[]) => {
      const refusedItems: Item[] = rejected.map((r) => ({
        id: ++serial.current,
        name: r.file.name,
        size: r.file.size,
        progress: 0,
        status: "refused",
        message: r.errors
          .map((e) =>
            e.code === "file-too-large"
              ? `It is ${mb(r.file.size)}; photos up to ${mb(maxBytes)} are accepted.`
              : e.code === "file-invalid-type"
                ? "Not a JPEG, PNG, WebP or TIFF photo."
                : e.message,
          )
          .join(" "),
      }));
      const queued: (Item & { file: File })[] = accepted.map((file) => ({ id: ++serial.current, name: file.name, size: file.size, progress: 0, status: "waiting", file }));
      setItems((all) => [...queued.map(({ file: _file, ...it }) => it), ...refusedItems, ...all]);
      let next = 0;
      const worker = async () => {
        while (next < queued.length) {
          const item = queued[next++];
          update(item.id, { status: "uploading" });
          const res = await sendPhoto(item.file, profile, (f) => update(item.id, { progress: f }));
          if (res.status === 200 || res.status === 201) {
            update(item.id, {
              status: res.body.duplicate ? "duplicate" : "done",
              progress: 1,
              photoId: res.body.photo?.id,
              message: res.body.duplicate ? "Already uploaded before: this is the same photo." : "Stored.",
            });
          } else {
            update(item.id, { status: "refused", message: res.body.error?.message ?? `The server answered ${res.status}.` });
          }
        }
      };
      await Promise.all(Array.from({ length: Math.min(PARALLEL, queued.length) }, worker));
      if (queued.length) router.refresh();
    },
    [maxBytes, profile, router],
  );

  const { getRootProps, getInputProps, isDragActive } = useDropzone({ onDrop, accept: ACCEPT, maxSize: maxBytes, multiple: true });

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div className="space-y-1">
          <label htmlFor="upload-profile" className="block text-sm font-medium">
            Lighting profile for these photos
          </label>
          <select id="upload-profile" value={profile} onChange={(e) => setProfile(e.target.value)} className="min-h-11 rounded-lg border border-line bg-white px-2">
            <option value="">Choose later, while marking</option>
            {profiles.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </div>
      </div>
      <div
        {...getRootProps({
          "aria-label": "Upload rack photos",
          className: `flex min-h-36 cursor-pointer flex-col items-center justify-center rounded-xl border-2 border-dashed px-6 py-8 text-center focus:outline-none focus-visible:ring-4 focus-visible:ring-accent/30 ${
            isDragActive ? "border-accent bg-accent-soft" : "border-line bg-paper/40 hover:bg-paper"
          }`,
        })}
        data-testid="photo-dropzone"
        data-ready={ready ? "true" : undefined}
      >
        <input {...getInputProps()} data-testid="photo-input" />
        <p className="text-base font-semibold">{isDragActive ? "Drop the photos to upload them" : "Drop rack photos here, or press Enter to choose files"}</p>
        <p className="mt-1 text-sm text-ink-soft">JPEG, PNG, WebP or TIFF straight from the camera, up to {mb(maxBytes)} each; several at once.</p>
      </div>
      {items.length > 0 && (
        <ul aria-label="Uploads" className="divide-y divide-line rounded-xl border border-line bg-white" aria-live="polite">
          {items.map((it) => (
            <li key={it.id} data-testid="upload-item" data-status={it.status} className="flex flex-wrap items-center gap-3 px-4 py-2 text-sm">
              <span className="min-w-48 flex-1 truncate font-mono text-xs">{it.name}</span>
              <span className="w-20 text-right tabular-nums text-ink-soft">{mb(it.size)}</span>
              <progress max={1} value={it.progress} aria-label={`Upload progress of ${it.name}`} className="h-2 w-32" />
              <span className={`min-w-24 font-medium ${it.status === "refused" ? "text-bad" : it.status === "done" || it.status === "duplicate" ? "text-ok" : ""}`}>
                {it.status === "waiting" ? "Waiting" : it.status === "uploading" ? `${Math.round(it.progress * 100)} %` : it.status === "refused" ? "Refused" : it.status === "duplicate" ? "Known photo" : "Uploaded"}
              </span>
              {it.photoId && (
                <Link href={`/bench/photos/${it.photoId}`} className="inline-flex min-h-11 items-center rounded-lg bg-accent px-3 font-semibold text-white">
                  Mark vials
                </Link>
              )}
              {it.message && it.status !== "done" && <p className={`w-full text-xs ${it.status === "refused" ? "text-bad" : "text-ink-soft"}`}>{it.message}</p>}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
