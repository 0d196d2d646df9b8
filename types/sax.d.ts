// sax (installed with docx, through xml-js) ships no type definitions; only the parts the tests use are declared.
declare module 'sax' {
  interface SaxParser {
    onerror: (err: Error) => void
    ontext: (text: string) => void
    onattribute: (attr: { name: string; value: string }) => void
    write(xml: string): SaxParser
    close(): SaxParser
  }
  const sax: { parser(strict: boolean): SaxParser }
  export default sax
}
