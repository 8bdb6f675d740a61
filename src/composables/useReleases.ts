import { watch, type Ref } from 'vue'
import { getRelease, listReleases, type ReleaseSummary } from '@/api/releases'
import { useAsync } from './useAsync'

/** Every catalogue release, newest first; loaded when `active` is (or becomes) true. */
export function useReleases(active: Ref<boolean>) {
  const releases = useAsync(async () => (await listReleases()).sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id), { immediate: active.value })
  watch(active, (on) => {
    if (on) void releases.reload()
  })

  /** Puts a just-frozen release at the top, and marks the one of its campaign it replaces as superseded. */
  function addFrozen(release: ReleaseSummary): void {
    const list = (releases.data.value ?? []).map((r) => (r.campaign.id === release.campaign.id && r.supersededBy === null && r.id !== release.id ? { ...r, supersededBy: release.id } : r))
    releases.data.value = [release, ...list.filter((r) => r.id !== release.id)]
  }

  return { ...releases, addFrozen }
}

/** One release with its rows; an id of 0 means none is open. */
export function useRelease(id: Ref<number>) {
  const release = useAsync(async () => (id.value ? getRelease(id.value) : null), { immediate: id.value > 0 })
  watch(id, (next) => {
    if (next) void release.reload()
  })
  return release
}
