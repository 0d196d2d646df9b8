import { describe, expect, it } from 'vitest'
import { memberState } from '@/rounds/status'
import { linkify } from '@/utils/linkify'

const future = '2099-01-01T10:00:00.000Z'
const past = '2020-01-01T10:00:00.000Z'

describe('panel member invitation state', () => {
  it('tells account holders from invited experts', () => {
    expect(memberState({ userId: 7, notifiedAt: null, invitation: null }, 'draft').key).toBe('account')
    expect(memberState({ userId: null, notifiedAt: null, invitation: null }, 'draft')).toMatchObject({ key: 'pending', label: 'To be invited' })
  })

  it('follows a link from sent to accepted, expired or withdrawn', () => {
    const inv = { id: 1, invitedAt: past, expiresAt: future, acceptedAt: null, expired: false }
    expect(memberState({ userId: null, notifiedAt: past, invitation: inv }, 'open')).toMatchObject({ key: 'invited', label: 'Invited' })
    expect(memberState({ userId: 9, notifiedAt: past, invitation: { ...inv, acceptedAt: past } }, 'open').key).toBe('accepted')
    expect(memberState({ userId: null, notifiedAt: past, invitation: { ...inv, expiresAt: past, expired: true } }, 'open').key).toBe('expired')
    expect(memberState({ userId: null, notifiedAt: past, invitation: null }, 'open').key).toBe('no-link')
  })
})

describe('mailbox body links', () => {
  it('splits text into text and links, leaving sentence punctuation out of the link', () => {
    expect(linkify('Open http://localhost:3000/invite/abc_DEF-123. Thanks')).toEqual([
      { kind: 'text', text: 'Open ' },
      { kind: 'link', text: 'http://localhost:3000/invite/abc_DEF-123', href: 'http://localhost:3000/invite/abc_DEF-123' },
      { kind: 'text', text: '. Thanks' },
    ])
    expect(linkify('no links here')).toEqual([{ kind: 'text', text: 'no links here' }])
  })
})
