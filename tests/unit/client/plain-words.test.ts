import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'

/**
 * The texts experts read, checked for the old wording that assumed statistics. This reads the sources rather than the
 * built client: the e-mails are written on the server and never reach dist/, and a unit test must not depend on a
 * build. Whitespace is collapsed and string literals joined with + are joined, so a sentence split over lines (as Vue
 * templates and long literals are) is still found.
 */
const root = join(__dirname, '../../..')
const inFolder = (folder: string, ext: RegExp) => readdirSync(join(root, folder)).filter((f) => ext.test(f)).map((f) => join(folder, f))

const EXPERT_FILES = [
  ...inFolder('src/components/answer', /\.vue$/),
  ...inFolder('src/answer', /\.ts$/),
  'src/components/rounds/PracticeQuestion.vue',
  'src/components/rounds/PracticeFeedback.vue',
  'src/components/rounds/DeclarationForm.vue',
  'src/components/rounds/DensitySketch.vue',
  'src/views/AnswerView.vue',
  'src/views/InviteView.vue',
  'src/rounds/practice.ts',
  'src/rounds/edges.ts',
  'server/mail/templates.ts',
]

/** Old sentences and fragments, each with why it went. */
const OLD: [string, string][] = [
  ['which value splits that lower part into two equally likely halves', 'quartiles asked in the abstract; now with the expert’s own numbers'],
  ['That is your lower quartile', 'statistical term as the point of the question'],
  ['sum of squared errors', 'fit criterion shown to experts (kept for analysts)'],
  ['best fit', 'ranking by error sum; experts read "closest to your values"'],
  ['SSE {{', 'error sum shown to experts'],
  ['Shape of the distribution', 'family names for experts; now shapes in words'],
  ["text: 'Density'", 'chart axis; now "more likely ↑"'],
  ['positive (0 to ∞)', 'support in set notation; now "any value above 0"'],
  ['any real number', 'support in mathematical words'],
  ['`[${', 'intervals as "[0, 5)"; now "0 to under 5"'],
  ['METHOD_LABELS', 'method names as headings; now "How you answer: …"'],
  ['FAMILY_LABELS', 'family names (lognormal, gamma…) for experts'],
  ['of its probability below it', 'practice feedback; now "a 31 % chance of a value this low or lower"'],
  ['Fitted distribution:', 'practice feedback naming the family'],
  ['Probability below', 'practice feedback table in cumulative terms'],
  ['bounds count as your 5 % and 95 %', 'a second definition of the plausible bounds'],
  ['inside your range from the 5 % to the 95 % value', 'a second definition of the plausible bounds'],
  ['until the round closes', 'e-mails promised changes after submitting'],
  ['takes that into account when the prior is combined with those data', 'declaration hint in statistical terms'],
  ['It should not, much', 'unclear sentence; now "It should not surprise you much"'],
]

/** The file's text without comments (which may name the method for developers), on one line. */
function normalised(file: string): string {
  return readFileSync(join(root, file), 'utf8')
    .replace(/\/\*[\s\S]*?\*\//g, ' ')
    .replace(/<!--[\s\S]*?-->/g, ' ')
    .replace(/(^|\s)\/\/[^\n]*/g, ' ')
    .replace(/\s+/g, ' ')
    .replace(/(['"`]) ?\+ ?(['"`])/g, '')
}

describe('plain words on the experts’ screens and in their e-mails', () => {
  it('reads every expert-facing file', () => {
    expect(EXPERT_FILES.length).toBeGreaterThan(20)
    for (const file of EXPERT_FILES) expect(normalised(file).length, file).toBeGreaterThan(100)
  })

  it.each(OLD)('no longer says “%s” (%s)', (old) => {
    const found = EXPERT_FILES.filter((file) => normalised(file).includes(old))
    expect(found).toEqual([])
  })

  it('says the new things', () => {
    const all = EXPERT_FILES.map(normalised).join('\n')
    for (const text of ['more likely ↑', 'It should not surprise you much', 'so that the same information is not counted twice', 'How you answer:', 'this low or lower']) {
      expect(all.includes(text), text).toBe(true)
    }
    // One definition of the plausible bounds: the practice, the quantile questions and the e-mails say it with the same words.
    for (const file of ['src/rounds/practice.ts', 'src/answer/quantile.ts', 'src/components/rounds/PracticeQuestion.vue', 'src/components/rounds/PracticeFeedback.vue', 'server/mail/templates.ts']) {
      expect(normalised(file).includes('PLAUSIBLE_BOUND_WORDS'), file).toBe(true)
    }
  })
})
