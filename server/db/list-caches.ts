/**
 * The answers of the lists read most often — a person's projects, a project's runs, a person's notifications —
 * as JSON text, reused between requests (ModelReadCache, ACCESS_CACHE_SECONDS) instead of one query each.
 * Each is dropped at once by every write in this process of what it shows (models watched below, and
 * `touchProject`'s raw update), and by every run change another process announces (`runsChangedElsewhere`:
 * run workers in Redis mode write run rows, finish runs and touch their projects). The text held by all three
 * together is bounded by LIST_CACHE_MIB.
 */
import type { AppConfig } from '../config';
import { ModelReadCache, type ModelReadCacheOptions } from '../lib/model-read-cache';
import { NotificationModel } from '../components/notifications/notification.model';
import { MembershipModel } from '../components/projects/membership.model';
import { onProjectTouched, ProjectModel } from '../components/projects/project.model';
import { RevisionModel } from '../components/revisions/revision.model';
import { RunModel } from '../components/runs/run.model';
import { UserModel } from '../components/users/user.model';

const OFF: ModelReadCacheOptions = { ttlMs: 0, maxEntries: 0 };
/** JavaScript strings hold two bytes per character. */
const textBytes = (text: string) => 2 * text.length;

/** `GET /api/projects` answers, keyed by the person and the list's query. */
export const projectLists = new ModelReadCache<string>(OFF, textBytes);
/** `GET /api/projects/:id/runs` answers, keyed by the project and the list's query (the same for every member). */
export const runLists = new ModelReadCache<string>(OFF, textBytes);
/** `GET /api/notifications` answers, keyed by the person and the list's query. */
export const notificationLists = new ModelReadCache<string>(OFF, textBytes);

const caches = [projectLists, runLists, notificationLists];

/**
 * A list's answer as JSON text: kept in `cache` under whose it is (person or project) and the parsed query
 * (closed lists and numbers), else `load`ed and kept.
 */
export function cachedList(cache: ModelReadCache<string>, owner: number, query: object, load: () => Promise<unknown>): Promise<string> {
  return cache.get(`${owner} ${JSON.stringify(query)}`, async () => JSON.stringify(await load()));
}

export function configureListCaches(config: Pick<AppConfig, 'ACCESS_CACHE_SECONDS' | 'ACCESS_CACHE_ENTRIES' | 'LIST_CACHE_MIB'>) {
  // One budget shared by the three lists.
  const options = { ttlMs: config.ACCESS_CACHE_SECONDS * 1000, maxEntries: config.ACCESS_CACHE_ENTRIES, maxBytes: Math.floor((config.LIST_CACHE_MIB * 1024 * 1024) / caches.length) };
  for (const cache of caches) cache.configure(config.LIST_CACHE_MIB > 0 ? options : OFF);
}

/** Installs the hooks that drop the lists; after the models' `init` (createSequelize). */
export function watchListWrites() {
  projectLists.watch(ProjectModel, MembershipModel, UserModel);
  runLists.watch(RunModel, RevisionModel, UserModel);
  notificationLists.watch(NotificationModel, ProjectModel, UserModel);
  onProjectTouched((_projectId, transaction) => projectLists.changed(transaction));
}

/** Another process changed a run (its queue announced it): every list that shows runs or a project's last change. */
export function runsChangedElsewhere() {
  for (const cache of caches) cache.clear();
}
