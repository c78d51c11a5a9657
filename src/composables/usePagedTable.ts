import { computed, reactive, ref, shallowRef } from 'vue'
import type { Page } from '@shared/schemas'
import type { ListParams } from '@/api/farms'
import { config } from '@/config'

export interface TableChangePagination {
  current?: number
  pageSize?: number
}
export interface TableChangeSorter {
  columnKey?: string | number
  field?: string | number | readonly (string | number)[]
  order?: 'ascend' | 'descend' | null
}

/**
 * Server-side paging, sorting and search for an ant-design-vue table. The page keeps its
 * own filters in `extra` (e.g. a role filter) and passes a loader that calls the API.
 */
export function usePagedTable<T, Extra extends Record<string, unknown> = Record<string, never>>(
  load: (params: ListParams & Partial<Extra>) => Promise<Page<T>>,
  options: { sort?: string; order?: 'asc' | 'desc'; extra?: Partial<Extra> } = {},
) {
  const rows = shallowRef<T[]>([])
  const total = ref(0)
  const loading = ref(false)
  const state = reactive({
    page: 1,
    pageSize: config.defaultPageSize as number,
    sort: options.sort,
    order: options.order ?? ('asc' as 'asc' | 'desc'),
    q: '',
  })
  const extra = reactive({ ...(options.extra ?? {}) }) as Partial<Extra>
  let generation = 0

  async function refresh(): Promise<void> {
    const mine = ++generation
    loading.value = true
    try {
      const page = await load({
        page: state.page,
        pageSize: state.pageSize,
        sort: state.sort,
        order: state.order,
        q: state.q.trim() || undefined,
        ...(extra as object),
      } as ListParams & Partial<Extra>)
      if (mine !== generation) return
      // A deletion can leave us past the last page: step back once.
      if (page.items.length === 0 && page.total > 0 && state.page > 1) {
        state.page = Math.max(1, Math.ceil(page.total / state.pageSize))
        await refresh()
        return
      }
      rows.value = page.items
      total.value = page.total
    } catch {
      // The http client already told the user; keep the rows we had.
    } finally {
      if (mine === generation) loading.value = false
    }
  }

  /** Handles the table's change event (page, page size, sort). */
  function onChange(pagination: TableChangePagination, _filters: unknown, sorter: TableChangeSorter | TableChangeSorter[]): void {
    const one = Array.isArray(sorter) ? sorter[0] : sorter
    if (pagination.pageSize && pagination.pageSize !== state.pageSize) {
      state.pageSize = pagination.pageSize
      state.page = 1
    } else if (pagination.current) {
      state.page = pagination.current
    }
    if (one && one.order) {
      state.sort = String(one.columnKey ?? one.field)
      state.order = one.order === 'descend' ? 'desc' : 'asc'
    } else if (one) {
      state.sort = options.sort
      state.order = options.order ?? 'asc'
    }
    void refresh()
  }

  /** New search text or filter: back to page 1. */
  function search(): void {
    state.page = 1
    void refresh()
  }

  /** The `sortOrder` a column should show, so the table reflects the server's order. */
  function sortOrderOf(key: string): 'ascend' | 'descend' | null {
    if (state.sort !== key) return null
    return state.order === 'desc' ? 'descend' : 'ascend'
  }

  const pagination = computed(() => ({
    current: state.page,
    pageSize: state.pageSize,
    total: total.value,
    showSizeChanger: true,
    pageSizeOptions: ['10', '20', '50', '100'],
    showTotal: (count: number) => `${count} in all`,
  }))

  return { rows, total, loading, state, extra, refresh, onChange, search, sortOrderOf, pagination }
}
