import { ref, watch, type Ref, type WatchSource } from 'vue'
import { useForm, type FormOptions, type GenericObject, type TypedSchema } from 'vee-validate'
import { ApiError } from '@/api/client'
import { notify } from './notify'
import { applyServerErrors } from './serverErrors'

/** Values a form starts from: any part of its fields. */
type PartialDeep<TValues extends GenericObject> = NonNullable<FormOptions<TValues>['initialValues']>

/** A saved object the form edits: its `version` is sent back so that a stale save answers 409. */
export interface Versioned {
  version: number
}

export interface DialogFormOptions<TValues extends GenericObject, TOutput extends GenericObject, TItem extends Versioned> {
  /** The dialog's or drawer's `v-model:open`. */
  open: Ref<boolean>
  /** The shared yup schema, wrapped with `toTypedSchema`. */
  schema: TypedSchema<TValues, TOutput>
  /** The values the form shows each time it opens. */
  values: () => PartialDeep<TValues>
  /** Also refill the form when this changes while the form is closed (a comment's section, the item to edit). */
  source?: WatchSource<unknown>
  /** Fields the server may name in a 400; its messages land on them, the rest above the form. */
  fields: readonly string[]
  /** Server field names whose message goes on another form field (`{ support: 'support.kind' }`). */
  fieldAliases?: Record<string, string>
  /** Sends the values (`version`: the saved version the edit started from, 0 for a new object). Closing follows. */
  save: (values: TOutput, version: number) => Promise<void>
  /**
   * For an edit of a saved object: the object when the form opened (its version is where the edit starts), and how
   * to fetch its newest saved version after a 409. Without it, a 409 is an error like any other.
   */
  versioned?: { item: () => TItem | null; reload: (item: TItem) => Promise<TItem> }
}

/**
 * The skeleton every form dialog and drawer shares: the form refilled when it opens, the shared schema checked in the
 * browser, the server's field errors put on their fields and the rest above the form, and for an edit, a 409 that
 * keeps what the user typed and offers the other person's version (`conflict`, `theirs`, `reload`), after which a
 * save replaces it. The dialog keeps its own fields, words and footer.
 */
export function useDialogForm<TValues extends GenericObject, TOutput extends GenericObject, TItem extends Versioned = Versioned>(
  options: DialogFormOptions<TValues, TOutput, TItem>,
) {
  const form = useForm<TValues, TOutput>({ validationSchema: options.schema, initialValues: options.values() })
  const formError = ref<string | null>(null)
  const baseVersion = ref(0)
  const conflict = ref(false)
  const reloading = ref(false)
  const theirs = ref<TItem | null>(null) as Ref<TItem | null>

  watch(
    () => [options.open.value, options.source ? readSource(options.source) : null] as const,
    ([isOpen], previous) => {
      // Fill the form when it opens, not when the list behind an open form refreshes.
      if (!isOpen || previous?.[0] === true) return
      form.resetForm({ values: options.values() })
      baseVersion.value = options.versioned?.item()?.version ?? 0
      formError.value = null
      conflict.value = false
      theirs.value = null
    },
    { immediate: true },
  )

  const placeError = (field: string, message: string) => form.setFieldError((options.fieldAliases?.[field] ?? field) as never, message)

  const onSubmit = form.handleSubmit(async (values) => {
    formError.value = null
    try {
      await options.save(values, baseVersion.value)
      // What is shown is now saved: closing asks nothing (a drawer asks before discarding unsaved changes).
      form.resetForm({ values: form.values as PartialDeep<TValues> })
      options.open.value = false
    } catch (error) {
      if (error instanceof ApiError && error.status === 409 && options.versioned?.item()) {
        conflict.value = true
        theirs.value = null
        return
      }
      formError.value = applyServerErrors(error, options.fields, placeError)
    }
  })

  /** Fetches the newest saved version after a 409: a save from here on replaces it. */
  async function reload(): Promise<void> {
    const item = options.versioned?.item()
    if (!options.versioned || !item) return
    reloading.value = true
    try {
      const latest = await options.versioned.reload(item)
      baseVersion.value = latest.version
      theirs.value = latest
    } catch (error) {
      notify.error(error instanceof Error ? error.message : 'Could not reload the saved version.')
    } finally {
      reloading.value = false
    }
  }

  return { ...form, formError, onSubmit, baseVersion, conflict, reloading, theirs, reload }
}

function readSource(source: WatchSource<unknown>): unknown {
  return typeof source === 'function' ? source() : source.value
}
