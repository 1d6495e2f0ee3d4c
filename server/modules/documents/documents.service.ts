import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { open, rename, rm, type FileHandle } from 'node:fs/promises';
import { join } from 'node:path';
import type { Request, RequestHandler } from 'express';
import multer from 'multer';
import { fileTypeFromBuffer } from 'file-type';
import type { Db } from '../../db/knex';
import type { Clock } from '../../clock';
import { HttpError, notFound } from '../../http/errors';
import type { AuditRepository } from '../audit/audit.repository';
import type { DocumentRecord, DocumentsRepository, OwnerType } from './documents.repository';

export const MAX_UPLOAD_BYTES = 10 * 1024 * 1024;
export const MAX_FILES = 6;
const ALLOWED: Record<string, string> = { 'application/pdf': 'pdf', 'image/jpeg': 'jpg', 'image/png': 'png' };
/** file-type reads at most this many bytes from a file's start. */
const HEAD_BYTES = 4100;
/** Where uploads are streamed while the request is read, under UPLOAD_DIR (same disk, so storing is a rename). */
export const INCOMING = '.incoming';

export type { OwnerType };

/** An uploaded file as the upload engine leaves it on `req.files`. */
export interface UploadedFile extends Express.Multer.File {
  /** The type read from the first bytes, when it is one we keep. */
  detectedMime: string | null;
  /** Why the bytes could not be written (ENOSPC, EACCES, …); the file is then not on disk. */
  writeError: string | null;
}

const isFsError = (err: unknown): err is NodeJS.ErrnoException => typeof (err as NodeJS.ErrnoException)?.code === 'string' && typeof (err as NodeJS.ErrnoException)?.syscall === 'string';

/**
 * Streams each file to a temporary file under UPLOAD_DIR, reading its type from the first bytes as
 * they arrive: a file of another type is never written (the rest of it is read and thrown away),
 * so memory stays flat whatever is sent and the disk holds only files we may keep. A write that
 * fails (a full disk, a folder not writable) does not fail the request: the file is marked, its
 * partial bytes removed, and the service decides (a fault is still recorded, and says so).
 */
class CheckedDiskStorage implements multer.StorageEngine {
  constructor(private readonly dir: string) {}

  _handleFile(_req: Request, file: Express.Multer.File, cb: (error?: unknown, info?: Partial<UploadedFile>) => void): void {
    const path = join(this.dir, `${randomUUID()}.part`);
    const run = async (): Promise<Partial<UploadedFile>> => {
      let head = Buffer.alloc(0);
      let size = 0;
      let decided = false;
      let detectedMime: string | null = null;
      let out: FileHandle | null = null;
      let writeError: string | null = null;
      const write = async (chunk: Buffer) => {
        if (writeError) return;
        try {
          out ??= await open(path, 'wx', 0o600);
          await out.write(chunk);
        } catch (err) {
          if (!isFsError(err)) throw err;
          writeError = err.code ?? 'EIO';
          await out?.close().catch(() => undefined);
          out = null;
          await rm(path, { force: true }).catch(() => undefined);
        }
      };
      const decide = async () => {
        decided = true;
        const type = head.length ? await fileTypeFromBuffer(head) : undefined;
        detectedMime = type && ALLOWED[type.mime] ? type.mime : null;
        if (detectedMime) await write(head);
      };
      try {
        for await (const chunk of file.stream as AsyncIterable<Buffer>) {
          size += chunk.length;
          if (!decided) {
            head = Buffer.concat([head, chunk]);
            if (head.length >= HEAD_BYTES) await decide();
          } else if (detectedMime) await write(chunk);
        }
        if (!decided) await decide();
      } catch (err) {
        // The request broke off mid-file: nothing of it stays.
        await (out as FileHandle | null)?.close().catch(() => undefined);
        await rm(path, { force: true }).catch(() => undefined);
        throw err;
      }
      if (out) {
        try {
          await (out as FileHandle).close();
        } catch (err) {
          if (!isFsError(err)) throw err;
          writeError = err.code ?? 'EIO';
          await rm(path, { force: true }).catch(() => undefined);
        }
      }
      const stored = Boolean(detectedMime) && !writeError;
      return { path: stored ? path : '', size, detectedMime, writeError };
    };
    run().then(
      (info) => cb(null, info),
      (err) => cb(err),
    );
  }

  _removeFile(_req: Request, file: Express.Multer.File, cb: (error: Error | null) => void): void {
    if (!file.path) return cb(null);
    rm(file.path, { force: true }).then(() => cb(null), () => cb(null));
  }
}

/**
 * Multipart parsing streamed to disk (bounded per file and in count). Whatever becomes of the
 * request, temporary files it left are removed when the answer is done (stored ones were moved).
 */
export function uploadMiddleware(uploadDir: string, field: string, maxCount = 1): RequestHandler {
  const incoming = join(uploadDir, INCOMING);
  mkdirSync(incoming, { recursive: true, mode: 0o700 });
  const parse = multer({ storage: new CheckedDiskStorage(incoming), limits: { fileSize: MAX_UPLOAD_BYTES, files: maxCount, fields: 20, fieldSize: 64 * 1024 } }).array(field, maxCount);
  return (req, res, next) => {
    res.on('close', () => {
      const files = (req.files as UploadedFile[] | undefined) ?? [];
      for (const f of files) if (f.path) void rm(f.path, { force: true }).catch(() => undefined);
    });
    parse(req, res, next);
  };
}

const toWire = (d: DocumentRecord) => ({
  id: d.id,
  ownerType: d.ownerType,
  ownerId: d.ownerId,
  kind: d.kind,
  originalName: d.originalName,
  mime: d.mime,
  size: d.size,
  uploadedAt: d.uploadedAt,
  url: `/api/documents/${d.id}/file`,
});

/** A display name with no path and no control characters. */
function cleanName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? 'file';
  // eslint-disable-next-line no-control-regex
  return base.replace(/[\u0000-\u001f\u007f"<>]/g, '').slice(0, 150) || 'file';
}

/** The name a file is shown and downloaded under ends in the extension of its checked type (`x.pdf.html` → `x.pdf`). */
export function displayName(name: string, ext: string | undefined): string {
  if (!ext) return name;
  const same = (e: string) => e.toLowerCase() === ext || (ext === 'jpg' && e.toLowerCase() === 'jpeg');
  const dot = name.lastIndexOf('.');
  const stem = dot > 0 && !same(name.slice(dot + 1)) ? name.slice(0, dot) : name;
  const last = stem.lastIndexOf('.');
  return last > 0 && same(stem.slice(last + 1)) ? stem : `${stem}.${ext}`;
}

/** Why a file's bytes could not be kept, in words for the person who sent it. */
function storageReason(code: string | null): string {
  if (code === 'ENOSPC' || code === 'EDQUOT' || code === 'EFBIG') return 'the server’s upload space is full';
  if (code === 'EACCES' || code === 'EPERM' || code === 'EROFS') return 'the server’s upload folder cannot be written to';
  return 'the server could not write it';
}

export function documentsService(deps: { repo: DocumentsRepository; clock: Clock; uploadDir: string; audit: AuditRepository }) {
  const { repo, clock, uploadDir } = deps;
  mkdirSync(uploadDir, { recursive: true });

  /** Refuses the upload as a whole for an empty file or one that is not a PDF, JPEG or PNG (read from its first bytes). */
  function checkFiles(files: UploadedFile[]) {
    for (const file of files) {
      if (file.size === 0) throw new HttpError(400, 'empty_file', `“${cleanName(file.originalname)}” is empty.`);
      if (!file.detectedMime) throw new HttpError(415, 'unsupported_file_type', `“${cleanName(file.originalname)}” is not a PDF, JPEG or PNG file.`);
    }
  }

  /**
   * Moves checked files into the upload folder for an owner, inside `trx`, under random names with
   * the extension of the type read from their bytes (never the sender's: `x.pdf.html` is kept as a
   * .pdf, and served as one). A file whose bytes could not be written is listed in `notStored`
   * rather than failing the whole request; files moved are removed again if the transaction fails.
   */
  async function store(trx: Db, owner: { type: OwnerType; id: number }, files: UploadedFile[], kind: string, actorId: number) {
    checkFiles(files);
    const moved: string[] = [];
    const stored = [];
    const notStored: Array<{ name: string; reason: string }> = [];
    try {
      for (const f of files) {
        const ext = ALLOWED[f.detectedMime!];
        const name = cleanName(f.originalname);
        let storedName: string | null = null;
        if (!f.writeError) {
          storedName = `${randomUUID()}.${ext}`;
          try {
            await rename(f.path, join(uploadDir, storedName));
            moved.push(storedName);
          } catch (err) {
            if (!isFsError(err)) throw err;
            await rm(f.path, { force: true }).catch(() => undefined);
            f.writeError = err.code ?? 'EIO';
            storedName = null;
          }
        }
        if (!storedName) {
          notStored.push({ name, reason: storageReason(f.writeError) });
          continue;
        }
        const doc = await repo.insert({ owner, kind, originalName: displayName(name, ext), storedName, mime: f.detectedMime!, size: f.size, uploadedBy: actorId }, clock.now(), trx);
        stored.push(toWire(doc));
        await deps.audit.record(trx, { actorId, action: 'document.added', entity: 'document', entityId: doc.id, after: { ownerType: owner.type, ownerId: owner.id, kind, name: doc.originalName, mime: doc.mime, size: doc.size } }, clock.now());
      }
      return { stored, notStored };
    } catch (err) {
      await Promise.all(moved.map((n) => rm(join(uploadDir, n), { force: true })));
      throw err;
    }
  }

  return {
    /** The multipart parser for a route taking up to `maxCount` files in `field`. */
    upload: (field: string, maxCount = 1) => uploadMiddleware(uploadDir, field, maxCount),
    checkFiles,
    store,
    async list(owner: { type: OwnerType; id: number }) {
      return (await repo.forOwner(owner)).map(toWire);
    },
    async file(id: number) {
      const doc = await repo.byId(id);
      if (!doc) throw notFound('That document');
      return { path: join(uploadDir, doc.storedName), mime: doc.mime, name: displayName(doc.originalName, ALLOWED[doc.mime]) };
    },
  };
}
export type DocumentsService = ReturnType<typeof documentsService>;
