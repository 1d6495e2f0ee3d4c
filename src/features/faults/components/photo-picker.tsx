import { useEffect, useId, useMemo } from 'react';
import { Camera, FileText, ImagePlus, X } from 'lucide-react';

export const MAX_PHOTOS = 6;
const MAX_BYTES = 10 * 1024 * 1024;
const ACCEPTED = ['image/jpeg', 'image/png', 'application/pdf'];

/** Why a file cannot be sent, or null. The server checks the bytes again; this saves a wasted upload. */
export function photoProblem(file: File): string | null {
  if (!ACCEPTED.includes(file.type)) return `${file.name} is not a JPEG, PNG or PDF. On an iPhone, set Camera › Formats to “Most Compatible”.`;
  if (file.size > MAX_BYTES) return `${file.name} is over 10 MB.`;
  return null;
}

/** Photos from the phone's camera (or files on a computer), with thumbnails and a remove button each. */
export function PhotoPicker({ files, onChange, error }: { files: File[]; onChange: (files: File[]) => void; error?: string }) {
  const id = useId();
  const previews = useMemo(() => files.map((f) => (f.type.startsWith('image/') ? URL.createObjectURL(f) : null)), [files]);
  useEffect(() => () => previews.forEach((u) => u && URL.revokeObjectURL(u)), [previews]);
  const add = (list: FileList | null) => {
    if (!list) return;
    onChange([...files, ...Array.from(list)].slice(0, MAX_PHOTOS));
  };
  const full = files.length >= MAX_PHOTOS;
  const button = 'flex min-h-12 cursor-pointer items-center justify-center gap-2 rounded-lg border-2 border-pine-700 bg-white px-4 font-medium text-pine-700 hover:bg-pine-50 has-[:focus-visible]:outline has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brass-500';
  return (
    <fieldset className="space-y-2" aria-describedby={`${id}-hint${error ? ` ${id}-error` : ''}`}>
      <legend className="text-sm font-medium text-ink">Photos (optional)</legend>
      <p id={`${id}-hint`} className="text-xs text-muted">Up to {MAX_PHOTOS} JPEG, PNG or PDF files, 10 MB each. A photo of the marking or the damage helps the rigger.</p>
      {full ? null : (
        <div className="grid gap-2 sm:grid-cols-2">
          <label className={button}>
            <Camera className="size-5" aria-hidden /> Take a photo
            <input type="file" accept="image/*" capture="environment" multiple className="sr-only" onChange={(e) => { add(e.target.files); e.target.value = ''; }} />
          </label>
          <label className={button}>
            <ImagePlus className="size-5" aria-hidden /> Choose files
            <input type="file" accept="image/jpeg,image/png,application/pdf" multiple className="sr-only" onChange={(e) => { add(e.target.files); e.target.value = ''; }} />
          </label>
        </div>
      )}
      {files.length ? (
        <ul className="flex flex-wrap gap-4 pt-2">
          {files.map((f, i) => {
            const problem = photoProblem(f);
            return (
              <li key={`${f.name}-${i}`} className={`relative w-24 rounded-lg border bg-white p-1 text-xs ${problem ? 'border-stop-700' : 'border-line'}`}>
                {previews[i] ? <img src={previews[i]!} alt="" className="h-20 w-full rounded object-cover" /> : <FileText className="mx-auto h-20 w-10 text-muted" aria-hidden />}
                <p className="truncate" title={f.name}>{f.name}</p>
                {/* Below the preview, not over it: the photo stays fully visible while deciding. */}
                <button type="button" onClick={() => onChange(files.filter((_, j) => j !== i))} className="mt-1 flex min-h-11 w-full items-center justify-center gap-1 rounded border border-line bg-white text-ink hover:bg-pine-50" aria-label={`Remove ${f.name}`}>
                  <X className="size-4" aria-hidden /> Remove
                </button>
              </li>
            );
          })}
        </ul>
      ) : null}
      {error ? <p id={`${id}-error`} role="alert" className="text-sm text-stop-700">{error}</p> : null}
    </fieldset>
  );
}
