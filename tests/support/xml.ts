import sax from 'sax'

/**
 * XML 1.0 production [2] Char (W3C, Extensible Markup Language 1.0, 5th edition, 2008, §2.2): the only characters a
 * document may hold, written out or as a character reference. C0 controls other than tab, LF and CR, U+FFFE, U+FFFF
 * and unpaired surrogates are outside it, and Word refuses a part that holds one.
 */
const NOT_XML_CHAR = /[^\t\n\r\u0020-\uD7FF\uE000-\uFFFD\u{10000}-\u{10FFFF}]/u

/** Parses `xml` strictly (sax, strict mode) and checks every character, also those written as references; throws on the first fault. */
export function assertWellFormedXml(xml: string, part: string): void {
  const bad = (where: string, text: string) => {
    const m = NOT_XML_CHAR.exec(text)
    if (m) throw new Error(`${part}: ${where} holds U+${m[0].codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}, which XML 1.0 does not allow`)
  }
  bad('the file', xml)
  const parser = sax.parser(true)
  parser.onerror = (err) => {
    throw new Error(`${part}: ${err.message.split('\n')[0]}`)
  }
  parser.ontext = (t) => bad('a text node', t)
  parser.onattribute = (a) => bad(`attribute ${a.name}`, a.value)
  parser.write(xml).close()
}
