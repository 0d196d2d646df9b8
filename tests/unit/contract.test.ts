import { describe, expectTypeOf, it } from 'vitest'
import type { InferType, Schema } from 'yup'
/**
 * The wire contract, checked by the compiler: for every route, the type the client's `src/api` call resolves to is
 * the type the server's service returns. Both sides take it from `shared/api/`, so this file holds as long as
 * nobody re-types a response on one side. The assertions are types: `npm run typecheck` (vue-tsc over src/, server/,
 * shared/ and tests/ in one program) is what fails when the two sides drift; vitest runs the file as well.
 *
 * Routes whose body is built in the route itself (sign-in's CSRF token, the saved judgement, practice feedback,
 * the accepted invitation, the JSON export, the mailbox, the directory) declare it there with `satisfies`.
 */
import type { authApi } from '@/api/auth'
import type { calibrationApi } from '@/api/calibration'
import type { configApi } from '@/api/config'
import type { impactApi } from '@/api/impact'
import type { invitationsApi } from '@/api/invitations'
import type { judgementsApi } from '@/api/judgements'
import type { linkReconciliationApi } from '@/api/link-reconciliation'
import type { linksApi } from '@/api/links'
import type { mailboxApi } from '@/api/mailbox'
import type { pilotApi } from '@/api/pilot'
import type { quantitiesApi } from '@/api/quantities'
import type { reconciliationApi } from '@/api/reconciliation'
import type { recordApi } from '@/api/record'
import type { roundsApi } from '@/api/rounds'
import type { studiesApi } from '@/api/studies'
import type { studyAdminApi } from '@/api/studyAdmin'
import type { usersApi } from '@/api/users'
import type { ImpactRequest } from '@shared/api/impact'
import type { JudgementSave } from '@shared/api/judgements'
import type { LinkReconciliationSaveBody } from '@shared/api/link-reconciliation'
import type { LinkAnswerSave, LinkOrderBody, LinkPatchBody, LinkWriteBody } from '@shared/api/links'
import type { ReconciliationSaveBody } from '@shared/api/reconciliation'
import type { RecordSubmission } from '@shared/api/records'
import type { AppConfig, DirectoryUser, User } from '@shared/api/users'
import type { MailboxMessage } from '@shared/api/mailbox'
import type { InvitationAccepted } from '@shared/api/invitations'
import type { JudgementSaved } from '@shared/api/judgements'
import type { PracticeResult } from '@shared/api/rounds'
import type { impactSchema } from '@shared/schemas/impact'
import type { judgementSchema } from '@shared/schemas/judgements'
import type { linkReconciliationSchema } from '@shared/schemas/link-reconciliation'
import type { linkAnswerSchema, linkOrderSchema, linkSchema, linkUpdateSchema } from '@shared/schemas/links'
import type { reconciliationSchema } from '@shared/schemas/reconciliation'
import type { recordSubmitSchema } from '@shared/schemas/records'
import type { listOutbox } from '../../server/mail/outbox'
import type { createDataset, getDataset, listDatasets } from '../../server/services/datasets'
import type { latestImpact, recordImpactNotRun } from '../../server/services/impact'
import type { activeImpactJobs, toImpactJob } from '../../server/services/impact-jobs'
import type { describeInvitation } from '../../server/services/invitations'
import type { getLink, linkAnswerHistory, listLinkAnswers, reorderLinks, saveLinkAnswer } from '../../server/services/links'
import type { feedbackFor, listCalibrationAnswers, listJudgements, saveCalibrationAnswer } from '../../server/services/judgements'
import type { confirmEarlierDeclaration, roundEntry, saveDeclaration } from '../../server/services/invitations'
import type {
  addEvidenceFile, createCalibrationQuestion, createQuantity, getQuantity, listCalibrationQuestions, listQuantities, updateCalibrationQuestion, updateQuantity,
} from '../../server/services/quantities'
import type { getReconciliation, saveReconciliation } from '../../server/services/reconciliation'
import type { decideLink, studyLinkedQuantities } from '../../server/services/link-reconciliation'
import type { getRecord } from '../../server/services/records'
import type { getRound, listMyRounds, listRounds, roundProgress } from '../../server/services/rounds'
import type { createStudy, getStudyDetail, listStudiesFor, studyAudit, updateStudy } from '../../server/services/studies'
import type { createUser, listUsers, updateUser } from '../../server/services/users'

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Fn = (...args: any[]) => unknown
/** What a client call resolves to. */
type Fetched<F extends Fn> = Awaited<ReturnType<F>>
/** What a server service hands to `res.json`. */
type Served<F extends Fn> = Awaited<ReturnType<F>>
/** The fields a yup schema checks, each of the type it lets through (defaults make them optional to send). */
type Accepted<S extends Schema> = Partial<InferType<S>>

describe('the wire contract (checked by the type-check)', () => {
  it('studies, members and the audit trail', () => {
    expectTypeOf<Fetched<typeof studiesApi.list>>().toEqualTypeOf<Served<typeof listStudiesFor>>()
    expectTypeOf<Fetched<typeof studiesApi.create>>().toEqualTypeOf<Served<typeof createStudy>>()
    expectTypeOf<Fetched<typeof studiesApi.update>>().toEqualTypeOf<Served<typeof updateStudy>>()
    expectTypeOf<Fetched<typeof studiesApi.detail>>().toEqualTypeOf<Served<typeof getStudyDetail>>()
    expectTypeOf<Fetched<typeof studiesApi.addMember>>().toEqualTypeOf<Served<typeof getStudyDetail>>()
    expectTypeOf<Fetched<typeof studyAdminApi.audit>>().toEqualTypeOf<Served<typeof studyAudit>>()
    expectTypeOf<Fetched<typeof studyAdminApi.outbox>>().toEqualTypeOf<Served<typeof listOutbox>>()
  })

  it('users, the session and the configuration', () => {
    expectTypeOf<Fetched<typeof usersApi.list>>().toEqualTypeOf<Served<typeof listUsers>>()
    expectTypeOf<Fetched<typeof usersApi.create>>().toEqualTypeOf<Served<typeof createUser>>()
    expectTypeOf<Fetched<typeof usersApi.update>>().toEqualTypeOf<Served<typeof updateUser>>()
    expectTypeOf<Fetched<typeof authApi.me>>().toEqualTypeOf<User>()
    expectTypeOf<Fetched<typeof authApi.signIn>>().toEqualTypeOf<User>()
    expectTypeOf<Fetched<typeof studyAdminApi.directory>>().toEqualTypeOf<DirectoryUser[]>()
    expectTypeOf<Fetched<typeof configApi.get>>().toEqualTypeOf<AppConfig>()
    expectTypeOf<Fetched<typeof mailboxApi.list>>().toEqualTypeOf<MailboxMessage[]>()
  })

  it('quantities and calibration questions', () => {
    expectTypeOf<Fetched<typeof quantitiesApi.list>>().toEqualTypeOf<Served<typeof listQuantities>>()
    expectTypeOf<Fetched<typeof quantitiesApi.get>>().toEqualTypeOf<Served<typeof getQuantity>>()
    expectTypeOf<Fetched<typeof quantitiesApi.create>>().toEqualTypeOf<Served<typeof createQuantity>>()
    expectTypeOf<Fetched<typeof quantitiesApi.update>>().toEqualTypeOf<Served<typeof updateQuantity>>()
    expectTypeOf<Fetched<typeof quantitiesApi.uploadFile>>().toEqualTypeOf<Served<typeof addEvidenceFile>>()
    expectTypeOf<Fetched<typeof calibrationApi.list>>().toEqualTypeOf<Served<typeof listCalibrationQuestions>>()
    expectTypeOf<Fetched<typeof calibrationApi.create>>().toEqualTypeOf<Served<typeof createCalibrationQuestion>>()
    expectTypeOf<Fetched<typeof calibrationApi.update>>().toEqualTypeOf<Served<typeof updateCalibrationQuestion>>()
  })

  it('rounds, progress and the expert’s entry', () => {
    expectTypeOf<Fetched<typeof roundsApi.list>>().toEqualTypeOf<Served<typeof listRounds>>()
    expectTypeOf<Fetched<typeof roundsApi.get>>().toEqualTypeOf<Served<typeof getRound>>()
    expectTypeOf<Fetched<typeof roundsApi.mine>>().toEqualTypeOf<Served<typeof listMyRounds>>()
    expectTypeOf<Fetched<typeof roundsApi.progress>>().toEqualTypeOf<Served<typeof roundProgress>>()
    expectTypeOf<Fetched<typeof roundsApi.entry>>().toEqualTypeOf<Served<typeof roundEntry>>()
    expectTypeOf<Fetched<typeof roundsApi.saveDeclaration>>().toEqualTypeOf<Served<typeof saveDeclaration>>()
    expectTypeOf<Fetched<typeof roundsApi.confirmDeclaration>>().toEqualTypeOf<Served<typeof confirmEarlierDeclaration>>()
    expectTypeOf<Fetched<typeof roundsApi.practice>>().toEqualTypeOf<PracticeResult>()
    expectTypeOf<Fetched<typeof invitationsApi.get>>().toEqualTypeOf<Served<typeof describeInvitation>>()
    expectTypeOf<Fetched<typeof invitationsApi.accept>>().toEqualTypeOf<InvitationAccepted>()
  })

  it('judgements, calibration answers and feedback', () => {
    expectTypeOf<Fetched<typeof judgementsApi.list>>().toEqualTypeOf<Served<typeof listJudgements>>()
    expectTypeOf<Fetched<typeof judgementsApi.submit>>().toEqualTypeOf<Served<typeof listJudgements>>()
    expectTypeOf<Fetched<typeof judgementsApi.save>>().toEqualTypeOf<JudgementSaved>()
    expectTypeOf<Fetched<typeof judgementsApi.calibrationAnswers>>().toEqualTypeOf<Served<typeof listCalibrationAnswers>>()
    expectTypeOf<Fetched<typeof judgementsApi.saveCalibration>>().toEqualTypeOf<Served<typeof saveCalibrationAnswer>>()
    expectTypeOf<Fetched<typeof judgementsApi.feedback>>().toEqualTypeOf<Served<typeof feedbackFor>>()
  })

  it('reconciliation, pilot data, impact and the record', () => {
    expectTypeOf<Fetched<typeof reconciliationApi.get>>().toEqualTypeOf<Served<typeof getReconciliation>>()
    expectTypeOf<Fetched<typeof reconciliationApi.save>>().toEqualTypeOf<Served<typeof saveReconciliation>>()
    expectTypeOf<Fetched<typeof linkReconciliationApi.studyLinks>>().toEqualTypeOf<Served<typeof studyLinkedQuantities>>()
    expectTypeOf<Fetched<typeof linkReconciliationApi.decide>>().toEqualTypeOf<Served<typeof decideLink>>()
    expectTypeOf<Fetched<typeof pilotApi.list>>().toEqualTypeOf<Served<typeof listDatasets>>()
    expectTypeOf<Fetched<typeof pilotApi.get>>().toEqualTypeOf<Served<typeof getDataset>>()
    expectTypeOf<Fetched<typeof pilotApi.upload>>().toEqualTypeOf<Served<typeof createDataset>>()
    expectTypeOf<Fetched<typeof impactApi.run>>().toEqualTypeOf<Served<typeof toImpactJob>>()
    expectTypeOf<Fetched<typeof impactApi.job>>().toEqualTypeOf<Served<typeof toImpactJob>>()
    expectTypeOf<Fetched<typeof impactApi.cancel>>().toEqualTypeOf<Served<typeof toImpactJob>>()
    expectTypeOf<Fetched<typeof impactApi.active>>().toEqualTypeOf<Served<typeof activeImpactJobs>>()
    expectTypeOf<Fetched<typeof impactApi.latest>>().toEqualTypeOf<Served<typeof latestImpact>>()
    expectTypeOf<Fetched<typeof impactApi.notRun>>().toEqualTypeOf<Served<typeof recordImpactNotRun>>()
    expectTypeOf<Fetched<typeof recordApi.get>>().toEqualTypeOf<Served<typeof getRecord>>()
    expectTypeOf<Fetched<typeof recordApi.submit>>().toEqualTypeOf<Served<typeof getRecord>>()
    expectTypeOf<Fetched<typeof recordApi.signOff>>().toEqualTypeOf<Served<typeof getRecord>>()
  })

  it('round links and the experts’ answers to them', () => {
    expectTypeOf<Fetched<typeof linksApi.get>>().toEqualTypeOf<Served<typeof getLink>>()
    expectTypeOf<Fetched<typeof linksApi.create>>().toEqualTypeOf<Served<typeof getLink>>()
    expectTypeOf<Fetched<typeof linksApi.update>>().toEqualTypeOf<Served<typeof getLink>>()
    expectTypeOf<Fetched<typeof linksApi.reorder>>().toEqualTypeOf<Served<typeof reorderLinks>>()
    expectTypeOf<Fetched<typeof linksApi.answers>>().toEqualTypeOf<Served<typeof listLinkAnswers>>()
    expectTypeOf<Fetched<typeof linksApi.saveAnswer>>().toEqualTypeOf<Served<typeof saveLinkAnswer>>()
    expectTypeOf<Fetched<typeof linksApi.history>>().toEqualTypeOf<Served<typeof linkAnswerHistory>>()
  })

  it('each field the client sends has the type the server’s schema lets through', () => {
    expectTypeOf<JudgementSave>().toExtend<Accepted<typeof judgementSchema>>()
    expectTypeOf<ReconciliationSaveBody>().toExtend<Accepted<typeof reconciliationSchema>>()
    expectTypeOf<LinkReconciliationSaveBody>().toExtend<Accepted<typeof linkReconciliationSchema>>()
    expectTypeOf<RecordSubmission>().toExtend<Accepted<typeof recordSubmitSchema>>()
    expectTypeOf<ImpactRequest>().toExtend<Accepted<typeof impactSchema>>()
    expectTypeOf<LinkWriteBody>().toExtend<Accepted<typeof linkSchema>>()
    expectTypeOf<LinkPatchBody>().toExtend<Accepted<typeof linkUpdateSchema>>()
    expectTypeOf<LinkOrderBody>().toExtend<Accepted<typeof linkOrderSchema>>()
    expectTypeOf<LinkAnswerSave>().toExtend<Accepted<typeof linkAnswerSchema>>()
  })
})
