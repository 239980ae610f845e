import { Notice } from "@/components/ui/card";

/** Shown instead of the marking editor when the photo's file is no longer in storage. */
export function PhotoFileMissing({ name }: { name: string }) {
  return (
    <div className="mb-6" data-testid="photo-file-missing">
      <Notice tone="error" title="This photo's file is missing">
        The record of {name} is here, but its file is missing from storage, so it cannot be shown or measured. Upload the photo again, or ask an
        admin to restore it from a backup. Measurements already saved from it are listed below and are not affected.
      </Notice>
    </div>
  );
}
