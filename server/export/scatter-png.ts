import { deflateSync } from 'node:zlib'
import { formatNumber } from '../../shared/format'
import { axisTicks } from '../../shared/format/axis'
import { scatterAxes } from '../../shared/record/joint-draws'

/**
 * A scatter of joint draws as a PNG for the .docx, drawn pixel by pixel (no canvas on the server): a framed plot with
 * round ticks and their numbers, and each draw as a small translucent square. The axis names go in the caption beside it.
 */

/** CRC-32 of PNG chunks (ISO 3309, as the PNG specification, W3C 2003, §5.5, asks). */
const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1
  return c >>> 0
})
function crc32(bytes: Buffer): number {
  let c = 0xffffffff
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8)
  return (c ^ 0xffffffff) >>> 0
}

function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(4)
  head.writeUInt32BE(data.length)
  const body = Buffer.concat([Buffer.from(type, 'ascii'), data])
  const tail = Buffer.alloc(4)
  tail.writeUInt32BE(crc32(body))
  return Buffer.concat([head, body, tail])
}

/** An RGB image (3 bytes a pixel, rows top to bottom) as a PNG: 8-bit truecolour, each row with filter type 0 (PNG §§11.2.2, 9.2). */
export function encodePng(width: number, height: number, rgb: Uint8Array): Buffer {
  const header = Buffer.alloc(13)
  header.writeUInt32BE(width, 0)
  header.writeUInt32BE(height, 4)
  header.set([8, 2, 0, 0, 0], 8)
  const raw = Buffer.alloc((width * 3 + 1) * height)
  for (let y = 0; y < height; y++) Buffer.from(rgb.buffer, rgb.byteOffset + y * width * 3, width * 3).copy(raw, y * (width * 3 + 1) + 1)
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk('IHDR', header), chunk('IDAT', deflateSync(raw)), chunk('IEND', Buffer.alloc(0))])
}

/** 5 × 7 glyphs of the characters tick numbers use (each row five bits, left to right). */
const GLYPHS: Record<string, string[]> = {
  '0': ['01110', '10001', '10011', '10101', '11001', '10001', '01110'],
  '1': ['00100', '01100', '00100', '00100', '00100', '00100', '01110'],
  '2': ['01110', '10001', '00001', '00010', '00100', '01000', '11111'],
  '3': ['11110', '00001', '00001', '01110', '00001', '00001', '11110'],
  '4': ['00010', '00110', '01010', '10010', '11111', '00010', '00010'],
  '5': ['11111', '10000', '11110', '00001', '00001', '10001', '01110'],
  '6': ['00110', '01000', '10000', '11110', '10001', '10001', '01110'],
  '7': ['11111', '00001', '00010', '00100', '01000', '01000', '01000'],
  '8': ['01110', '10001', '10001', '01110', '10001', '10001', '01110'],
  '9': ['01110', '10001', '10001', '01111', '00001', '00010', '01100'],
  '.': ['00000', '00000', '00000', '00000', '00000', '01100', '01100'],
  '-': ['00000', '00000', '00000', '11111', '00000', '00000', '00000'],
  '+': ['00000', '00100', '00100', '11111', '00100', '00100', '00000'],
  e: ['00000', '00000', '01110', '10001', '11111', '10000', '01110'],
}

type Rgb = [number, number, number]
const INK: Rgb = [0x5f, 0x68, 0x73]
const FRAME: Rgb = [0x9a, 0xa5, 0xae]
const GRID: Rgb = [0xec, 0xe9, 0xe1]
/** The app's joint-prior teal, each draw at 35 % opacity so dense regions read darker. */
const POINT: Rgb = [0x1f, 0x6f, 0x5c]
const POINT_OPACITY = 0.35

class Raster {
  readonly rgb: Uint8Array
  constructor(readonly width: number, readonly height: number) {
    this.rgb = new Uint8Array(width * height * 3).fill(255)
  }
  blend(x: number, y: number, [r, g, b]: Rgb, a = 1): void {
    if (x < 0 || y < 0 || x >= this.width || y >= this.height) return
    const i = (y * this.width + x) * 3
    this.rgb[i] = Math.round(this.rgb[i] * (1 - a) + r * a)
    this.rgb[i + 1] = Math.round(this.rgb[i + 1] * (1 - a) + g * a)
    this.rgb[i + 2] = Math.round(this.rgb[i + 2] * (1 - a) + b * a)
  }
  rect(x0: number, y0: number, w: number, h: number, colour: Rgb, a = 1): void {
    for (let y = y0; y < y0 + h; y++) for (let x = x0; x < x0 + w; x++) this.blend(x, y, colour, a)
  }
  /** Text in the 5 × 7 glyphs at `scale`, anchored at its right end or its centre, top at y. */
  text(s: string, x: number, y: number, anchor: 'right' | 'centre', scale = 2): void {
    const advance = 6 * scale
    const width = s.length * advance - scale
    let left = anchor === 'right' ? x - width : Math.round(x - width / 2)
    for (const ch of s) {
      const glyph = GLYPHS[ch]
      if (glyph) glyph.forEach((row, gy) => [...row].forEach((bit, gx) => { if (bit === '1') this.rect(left + gx * scale, y + gy * scale, scale, scale, INK) }))
      left += advance
    }
  }
}

/** A scatter of the points (first value across, second up) on round axes around the middle 99 % of the draws, as a PNG. */
export function scatterPng(points: [number, number][], width = 720, height = 480): Buffer {
  const axes = scatterAxes(points)
  const img = new Raster(width, height)
  const plot = { left: 78, top: 14, right: width - 18, bottom: height - 42 }
  const px = (x: number) => Math.round(plot.left + ((x - axes.x.min) / (axes.x.max - axes.x.min)) * (plot.right - plot.left))
  const py = (y: number) => Math.round(plot.bottom - ((y - axes.y.min) / (axes.y.max - axes.y.min)) * (plot.bottom - plot.top))
  for (const t of axisTicks(axes.x)) {
    img.rect(px(t), plot.top, 1, plot.bottom - plot.top, GRID)
    img.rect(px(t), plot.bottom, 1, 6, FRAME)
    img.text(formatNumber(t, 4), px(t), plot.bottom + 12, 'centre')
  }
  for (const t of axisTicks(axes.y)) {
    img.rect(plot.left, py(t), plot.right - plot.left, 1, GRID)
    img.rect(plot.left - 6, py(t), 6, 1, FRAME)
    img.text(formatNumber(t, 4), plot.left - 12, py(t) - 7, 'right')
  }
  for (const [x, y] of points) {
    if (x < axes.x.min || x > axes.x.max || y < axes.y.min || y > axes.y.max) continue
    img.rect(px(x) - 1, py(y) - 1, 3, 3, POINT, POINT_OPACITY)
  }
  img.rect(plot.left, plot.top, plot.right - plot.left + 1, 1, FRAME)
  img.rect(plot.left, plot.bottom, plot.right - plot.left + 1, 1, FRAME)
  img.rect(plot.left, plot.top, 1, plot.bottom - plot.top, FRAME)
  img.rect(plot.right, plot.top, 1, plot.bottom - plot.top, FRAME)
  return encodePng(width, height, img.rgb)
}
