import { ref, watch } from 'vue'
import { defineStore } from 'pinia'
import {
  roundsApi,
  type MyRound,
  type Round,
  type RoundPatchBody,
  type RoundSummary,
  type RoundWriteBody,
} from '@/api/rounds'
import { useAuthStore } from './auth'

/** Elicitation rounds: per-study lists, rounds opened in this session, and the expert's own rounds. */
export const useRoundsStore = defineStore('rounds', () => {
  const lists = ref<Record<number, RoundSummary[]>>({})
  const rounds = ref<Record<number, Round>>({})
  const mine = ref<MyRound[] | null>(null)

  async function fetchList(studyId: number): Promise<RoundSummary[]> {
    const list = await roundsApi.list(studyId)
    lists.value[studyId] = list
    return list
  }

  /** Keeps a round the server sent back, and updates its row in the study's list when that is loaded. */
  function put(round: Round): Round {
    rounds.value[round.id] = round
    const list = lists.value[round.studyId]
    const row = list?.find((r) => r.id === round.id)
    if (row) {
      Object.assign(row, {
        title: round.title,
        status: round.status,
        opensAt: round.opensAt,
        closesAt: round.closesAt,
        panelSize: round.panel.length,
        submitted: round.panel.filter((m) => m.submittedAt).length,
        itemCount: round.items.length,
      })
    }
    return round
  }

  async function fetchRound(id: number): Promise<Round> {
    return put(await roundsApi.get(id))
  }

  async function create(studyId: number, body: RoundWriteBody): Promise<Round> {
    const round = await roundsApi.create(studyId, body)
    delete lists.value[studyId]
    return put(round)
  }

  const update = async (id: number, body: RoundPatchBody) => put(await roundsApi.update(id, body))
  const open = async (id: number) => put(await roundsApi.open(id))
  const close = async (id: number) => put(await roundsApi.close(id))
  const invite = async (id: number, body: { email: string; name: string }) => put(await roundsApi.invite(id, body))
  const removeMember = async (id: number, panelId: number) => put(await roundsApi.removeMember(id, panelId))
  const resend = async (id: number, panelId: number) => put(await roundsApi.resend(id, panelId))
  const revoke = async (id: number, panelId: number) => put(await roundsApi.revoke(id, panelId))

  async function fetchMine(): Promise<MyRound[]> {
    mine.value = await roundsApi.mine()
    return mine.value
  }

  function clear(): void {
    lists.value = {}
    rounds.value = {}
    mine.value = null
  }

  // What one account saw must not show for the next one signed in on this browser.
  const auth = useAuthStore()
  watch(
    () => auth.user?.id ?? null,
    (id, previous) => {
      if (id !== previous) clear()
    },
  )

  return { lists, rounds, mine, fetchList, fetchRound, create, update, open, close, invite, removeMember, resend, revoke, fetchMine, clear }
})
