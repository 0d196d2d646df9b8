/**
 * Labels Priorsmith no longer uses, each with why it went: they followed the look of existing elicitation programs or
 * misused a term of the trade. The built client, the record's JSON and its .docx must contain none of them.
 */
export const OLD_LABELS: [RegExp, string][] = [
  [/\bbest fit\b/i, 'a family ranked "best fit" beside its error sum; experts see no families, analysts read "closest"'],
  [/Reference prior/i, 'the prior Bayes factors are taken against is the comparison prior ("reference prior" means an objective prior)'],
  [/weight \(no cutoff\)/i, 'weights table column of dedicated classical-model software; now a bar with a tick for every expert kept'],
  [/weight \(cutoff 0\)/i, 'weights table column of dedicated classical-model software'],
  [/% vague/i, 'robust mixture wording of a clinical-trial prior package; now "% on the wide component"'],
  [/\bExpert [A-Z]{1,2}\b/, 'letter labels of another program’s panel plot; experts are Expert 1, 2, … everywhere'],
]

/** The old labels found in a text, with a little of the text around each. */
export function oldLabelsIn(text: string): string[] {
  return OLD_LABELS.flatMap(([pattern]) => {
    const m = new RegExp(pattern.source, pattern.flags.includes('g') ? pattern.flags : `${pattern.flags}g`).exec(text)
    return m ? [`${pattern}: …${text.slice(Math.max(0, m.index - 40), m.index + m[0].length + 40)}…`] : []
  })
}
