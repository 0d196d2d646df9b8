import { inflateRawSync } from 'node:zlib'

/**
 * The files of a ZIP archive (a .docx is one), read from its central directory: stored and deflated entries only,
 * which is all Word-format writers use (PKWARE APPNOTE 6.3, sections 4.3.7, 4.3.12 and 4.3.16).
 */
export function unzip(buffer: Buffer): Map<string, Buffer> {
  const end = buffer.lastIndexOf(Buffer.from([0x50, 0x4b, 0x05, 0x06]))
  if (end < 0) throw new Error('unzip: no end of central directory record')
  const count = buffer.readUInt16LE(end + 10)
  let at = buffer.readUInt32LE(end + 16)
  const files = new Map<string, Buffer>()
  for (let i = 0; i < count; i++) {
    if (buffer.readUInt32LE(at) !== 0x02014b50) throw new Error('unzip: broken central directory')
    const method = buffer.readUInt16LE(at + 10)
    const compressed = buffer.readUInt32LE(at + 20)
    const nameLength = buffer.readUInt16LE(at + 28)
    const extraLength = buffer.readUInt16LE(at + 30)
    const commentLength = buffer.readUInt16LE(at + 32)
    const local = buffer.readUInt32LE(at + 42)
    const name = buffer.toString('utf8', at + 46, at + 46 + nameLength)
    const dataStart = local + 30 + buffer.readUInt16LE(local + 26) + buffer.readUInt16LE(local + 28)
    const data = buffer.subarray(dataStart, dataStart + compressed)
    if (method !== 0 && method !== 8) throw new Error(`unzip: ${name} uses compression method ${method}`)
    files.set(name, method === 8 ? inflateRawSync(data) : Buffer.from(data))
    at += 46 + nameLength + extraLength + commentLength
  }
  return files
}
