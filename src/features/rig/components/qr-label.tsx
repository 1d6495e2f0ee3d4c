import { useEffect, useState } from 'react';

export interface LabelItem {
  key: string;
  /** Large type: the point label or the gear serial. */
  title: string;
  subtitle: string;
  /** Path inside the app, made absolute for the code. */
  path: string;
}

/** One printable label: a QR code to the record's page and its name in large type. */
export function QrLabel({ item }: { item: LabelItem }) {
  const url = `${window.location.origin}${item.path}`;
  const [src, setSrc] = useState<string | null>(null);
  const [failed, setFailed] = useState(false);
  useEffect(() => {
    let live = true;
    // The encoder loads only where labels are shown.
    import('qrcode')
      .then(({ default: QRCode }) => QRCode.toDataURL(url, { margin: 1, width: 320, errorCorrectionLevel: 'M' }))
      .then((data) => { if (live) setSrc(data); })
      .catch(() => { if (live) setFailed(true); });
    return () => { live = false; };
  }, [url]);
  return (
    <li className="flex break-inside-avoid items-center gap-4 rounded-xl border-2 border-ink bg-white p-4">
      <div className="flex size-32 shrink-0 items-center justify-center">
        {src ? <img src={src} alt={`QR code for ${item.title}`} className="size-32" /> : failed ? <span className="text-xs text-stop-700">QR code could not be made</span> : <span className="text-xs text-muted">Making QR code…</span>}
      </div>
      <div className="min-w-0">
        <p className="break-words text-3xl font-semibold leading-tight">{item.title}</p>
        <p className="text-sm">{item.subtitle}</p>
        <p className="mt-1 break-all text-xs text-muted">{url}</p>
      </div>
    </li>
  );
}
