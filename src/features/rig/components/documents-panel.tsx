import { useRef, useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { toast } from 'sonner';
import { FileText, Upload } from 'lucide-react';
import { documentKinds } from '../../../../shared/schemas/rig';
import { Button } from '../../../components/ui/button';
import { SelectField, TextField } from '../../../components/ui/field';
import { Card, EmptyState, ErrorState, Loading } from '../../../components/ui/states';
import { errorMessage } from '../../../lib/api-client';
import { rigQueries, useRigMutations, type DocumentOwner } from '../api';
import type { StudioFormat } from '../format';

type DocumentKind = (typeof documentKinds)[number];
const kindLabels: Record<DocumentKind, string> = { assessment: 'Engineer’s assessment', certificate: 'Maker’s certificate', photo: 'Photo', other: 'Other' };
const ACCEPT = 'application/pdf,image/jpeg,image/png';
const MAX_BYTES = 10 * 1024 * 1024;

function size(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

/** Files kept with a point (the engineer's assessment) or a gear item (the maker's certificate). */
export function DocumentsPanel({ owner, defaultKind, fmt, canUpload }: { owner: DocumentOwner; defaultKind: DocumentKind; fmt: StudioFormat; canUpload: boolean }) {
  const docs = useQuery(rigQueries.documents(owner));
  const { upload } = useRigMutations();
  const [kind, setKind] = useState<DocumentKind>(defaultKind);
  const [file, setFile] = useState<File | null>(null);
  const [error, setError] = useState<string | undefined>();
  const input = useRef<HTMLInputElement>(null);

  const pick = (f: File | null) => {
    setFile(f);
    setError(!f ? undefined : !['application/pdf', 'image/jpeg', 'image/png'].includes(f.type) ? 'Upload a PDF, JPEG or PNG file.' : f.size > MAX_BYTES ? `The file is ${size(f.size)}; the limit is 10 MB.` : undefined);
  };
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!file) return setError('Choose a file first.');
    if (error) return;
    upload.mutate({ owner, file, kind }, {
      onSuccess: () => {
        toast.success(`${file.name} uploaded.`);
        setFile(null);
        if (input.current) input.current.value = '';
      },
      onError: (err) => { setError(errorMessage(err)); toast.error(errorMessage(err)); },
    });
  };

  return (
    <Card className="space-y-4">
      <h2 className="font-semibold">Documents</h2>
      {docs.isPending ? <Loading label="Loading documents…" /> : docs.isError ? <ErrorState error={docs.error} retry={() => docs.refetch()} /> : docs.data.length === 0 ? (
        <EmptyState title="No documents yet">{owner.type === 'points' ? 'Keep the engineer’s assessment of the point here.' : 'Keep the maker’s certificate of the item here.'}</EmptyState>
      ) : (
        <ul className="divide-y divide-line">
          {docs.data.map((d) => (
            <li key={d.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 py-2">
              <FileText className="size-5 text-muted" aria-hidden />
              <a href={d.url} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center font-medium text-pine-700 underline underline-offset-2">{d.originalName}</a>
              <span className="text-sm text-muted">{kindLabels[d.kind]} · {size(d.size)} · uploaded {fmt.when(d.uploadedAt)}</span>
            </li>
          ))}
        </ul>
      )}
      {canUpload ? (
        <form onSubmit={submit} noValidate className="grid gap-3 sm:grid-cols-[1fr_14rem_auto] sm:items-start" aria-label="Upload a document">
          <TextField ref={input} type="file" label="File (PDF, JPEG or PNG, up to 10 MB)" accept={ACCEPT} error={error} onChange={(e) => pick(e.target.files?.[0] ?? null)} className="py-2" />
          <SelectField label="Kind of document" value={kind} onChange={(e) => setKind(e.target.value as DocumentKind)}>
            {documentKinds.map((k) => <option key={k} value={k}>{kindLabels[k]}</option>)}
          </SelectField>
          <Button type="submit" busy={upload.isPending} className="sm:mt-6"><Upload className="size-4" aria-hidden /> Upload</Button>
        </form>
      ) : null}
    </Card>
  );
}
