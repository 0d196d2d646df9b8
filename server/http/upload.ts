import type { Request, Response } from 'express'
import multer from 'multer'
import { HttpError } from './http-error'

/** Control characters, path separators, bidi overrides and broken surrogates have no place in a stored file name. */
const UNSAFE_IN_NAME = /[\u0000-\u001f\u007f-\u009f\\/\u200e\u200f\u202a-\u202e\u2066-\u2069\ufffe\uffff]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g
const NAME_MAX = 200

/** The uploaded name as it will be stored and shown: NFC, unsafe characters replaced, at most 200 characters (never half of one). */
export function cleanFileName(name: string): string {
  const cleaned = Array.from(name.normalize('NFC').replace(UNSAFE_IN_NAME, '_').trim()).slice(0, NAME_MAX).join('')
  return cleaned || 'file'
}

/**
 * Receives the one file field `file` into memory. Names arrive as UTF-8 (what browsers send), not busboy's latin1
 * default. A body multer cannot read — cut off, without a boundary, malformed — is the sender's fault: 400, not 500.
 */
export function fileReceiver(opts: { maxBytes: number; fields: number; tooLarge: string }) {
  const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: opts.maxBytes, files: 1, fields: opts.fields }, defParamCharset: 'utf8' })
  return (req: Request, res: Response) => new Promise<void>((resolve, reject) => {
    upload.single('file')(req, res, (err: unknown) => {
      if (err instanceof multer.MulterError) {
        const message = err.code === 'LIMIT_FILE_SIZE' ? opts.tooLarge : `Upload refused: ${err.message}`
        reject(new HttpError(400, message, { file: message }))
      } else if (err) {
        reject(new HttpError(400, 'The upload arrived incomplete or malformed; choose the file and send it again', { file: 'The upload arrived incomplete; send it again' }))
      } else {
        if (req.file) req.file.originalname = cleanFileName(req.file.originalname)
        resolve()
      }
    })
  })
}
