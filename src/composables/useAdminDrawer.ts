import { ref, type Ref } from 'vue'
import { message } from 'ant-design-vue'
import { useFormErrors } from '@/composables/useFormErrors'

type Check = ReturnType<typeof useFormErrors>['check']

export interface AdminDrawerOptions<Row extends { id: number; name: string }, Form extends Record<string, unknown>> {
  /** The drawer's form model (reactive). */
  form: Form
  /** The form's values for a new record (null) or for editing `row`. */
  fill: (row: Row | null) => Form
  /**
   * Checks the form and saves it (create when `editing` is null); returns the message to
   * show, or null when the form has errors (shown beside the fields by `check`).
   */
  submit: (editing: Row | null, check: Check) => Promise<string | null>
  /** Deletes a row (the delete button of EditDeleteActions). */
  remove?: (row: Row) => Promise<unknown>
  /** Reloads what the page shows after a save or a delete. */
  refresh: () => Promise<unknown>
}

/**
 * The create / edit drawer of an admin list page: open for a new record or for a row,
 * save with the shared schema's field messages (and the server's), delete with a message,
 * and reload the list after either. The list itself is usePagedTable's or a store's.
 */
export function useAdminDrawer<Row extends { id: number; name: string }, Form extends Record<string, unknown>>(options: AdminDrawerOptions<Row, Form>) {
  const editing = ref(null) as Ref<Row | null>
  const open = ref(false)
  const saving = ref(false)
  const { errors, status, check, fromError, clear } = useFormErrors(options.form)

  function openCreate(): void {
    editing.value = null
    Object.assign(options.form, options.fill(null))
    clear()
    open.value = true
  }

  function openEdit(row: Row): void {
    editing.value = row
    Object.assign(options.form, options.fill(row))
    clear()
    open.value = true
  }

  async function save(): Promise<void> {
    saving.value = true
    try {
      const done = await options.submit(editing.value, check)
      if (done === null) return
      message.success(done)
      open.value = false
      await options.refresh()
    } catch (error) {
      fromError(error)
    } finally {
      saving.value = false
    }
  }

  async function remove(row: Row): Promise<void> {
    if (!options.remove) return
    try {
      await options.remove(row)
      message.success(`${row.name} deleted.`)
      await options.refresh()
    } catch {
      // The http client shows why (e.g. a 409 naming what still uses the record).
    }
  }

  function close(): void {
    open.value = false
  }

  return { form: options.form, editing, open, saving, errors, status, openCreate, openEdit, close, save, remove }
}

/**
 * Creates or updates a named record and says so: "<name> added." or "<name> saved.".
 * @example await saveNamed(editing, input, { create: createMachine, update: updateMachine })
 */
export async function saveNamed<Input extends { name: string }>(
  editing: { id: number } | null,
  input: Input,
  api: { create: (input: Input) => Promise<unknown>; update: (id: number, input: Input) => Promise<unknown> },
): Promise<string> {
  if (editing) {
    await api.update(editing.id, input)
    return `${input.name} saved.`
  }
  await api.create(input)
  return `${input.name} added.`
}
