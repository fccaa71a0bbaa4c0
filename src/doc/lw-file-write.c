/* lw-file-write.c — files written whole or not at all (lw-file-write.h).
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include "lw-file-write.h"

#include <errno.h>
#include <signal.h>
#include <stdlib.h>
#include <fcntl.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <glib/gstdio.h>

#define MAX_LINKS 40
#define TEMP_SUFFIX_LEN 6

static gboolean
fail_errno (GError **error, const char *path, const char *what, int errsv)
{
  g_set_error (error, G_FILE_ERROR, g_file_error_from_errno (errsv), "%s: cannot %s: %s", path,
               what, g_strerror (errsv));
  return FALSE;
}

/* ---- following links -------------------------------------------------------------------- */

char *
lw_file_resolve_target (const char *path, GError **error)
{
  char *p = g_strdup (path);
  for (int hops = 0; hops <= MAX_LINKS; hops++)
    {
      struct stat st;
      if (lstat (p, &st) != 0 || !S_ISLNK (st.st_mode))
        return p;   /* a file, something else, or nothing yet: the target itself */
      g_autoptr (GError) e = NULL;
      g_autofree char *link = g_file_read_link (p, &e);
      if (link == NULL)
        {
          g_set_error (error, G_FILE_ERROR, e->code, "%s: cannot follow the symbolic link: %s",
                       path, e->message);
          g_free (p);
          return NULL;
        }
      char *next;
      if (g_path_is_absolute (link))
        next = g_steal_pointer (&link);
      else
        {
          g_autofree char *dir = g_path_get_dirname (p);
          next = g_build_filename (dir, link, NULL);
        }
      g_free (p);
      p = next;
    }
  g_set_error (error, G_FILE_ERROR, G_FILE_ERROR_LOOP,
               "%s: cannot follow the symbolic link: more than %d links in a row (a loop?)",
               path, MAX_LINKS);
  g_free (p);
  return NULL;
}

/* ---- temporary files, locks, stale ones -------------------------------------------------- */

static gboolean
is_temp_suffix (const char *s)
{
  if (strlen (s) != TEMP_SUFFIX_LEN)
    return FALSE;
  for (const char *c = s; *c != '\0'; c++)
    if (!g_ascii_isalnum (*c))
      return FALSE;
  return TRUE;
}

/* Removes our stale temporary files of the target dir/base (the rule in the header). */
static void
clean_stale (const char *dir, const char *base)
{
  GDir *d = g_dir_open (dir, 0, NULL);
  if (d == NULL)
    return;
  g_autofree char *prefix = g_strdup_printf (".%s.", base);
  size_t plen = strlen (prefix);
  time_t now = time (NULL);
  const char *name;
  while ((name = g_dir_read_name (d)) != NULL)
    {
      if (strncmp (name, prefix, plen) != 0 || !is_temp_suffix (name + plen))
        continue;
      g_autofree char *full = g_build_filename (dir, name, NULL);
      int fd = open (full, O_RDONLY | O_NOFOLLOW | O_NONBLOCK | O_NOCTTY | O_CLOEXEC);
      if (fd < 0)
        continue;
      struct stat st, again;
      if (fstat (fd, &st) == 0 && S_ISREG (st.st_mode) && st.st_uid == geteuid ()
          && now - st.st_mtime > LW_FILE_STALE_SECONDS && flock (fd, LOCK_EX | LOCK_NB) == 0
          && lstat (full, &again) == 0 && again.st_ino == st.st_ino && again.st_dev == st.st_dev)
        (void) g_unlink (full);
      close (fd);
    }
  g_dir_close (d);
}

/* A new locked temporary file ".base.XXXXXX" in dir; *tmp_path set. -1 with errno. */
static int
create_temp (const char *dir, const char *base, char **tmp_path)
{
  char *tmpl = g_strdup_printf ("%s%c.%s.XXXXXX", dir, G_DIR_SEPARATOR, base);
  int fd = g_mkstemp_full (tmpl, O_RDWR | O_CLOEXEC, 0666);
  if (fd < 0)
    {
      int e = errno;
      g_free (tmpl);
      errno = e;
      return -1;
    }
  /* held until the file is renamed and closed: the mark of a live writer */
  (void) flock (fd, LOCK_EX);
  *tmp_path = tmpl;
  return fd;
}

static int
write_all (int fd, const void *data, size_t len)
{
  const char *p = data;
  while (len > 0)
    {
      ssize_t n = write (fd, p, len);
      if (n < 0)
        {
          if (errno == EINTR)
            continue;
          return -1;
        }
      p += n;
      len -= (size_t) n;
    }
  return 0;
}

static void
sync_dir (const char *dir)
{
  int dfd = open (dir, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dfd >= 0)
    {
      (void) fsync (dfd);
      close (dfd);
    }
}

/* One file of a set, from resolving its target to its synced temporary file. */
typedef struct
{
  const char *shown;   /* the path as the caller gave it (for messages) */
  char *target;        /* after following links */
  char *dir, *base;
  gboolean existed;
  mode_t mode;
  char *tmp;           /* the temporary file, NULL once renamed or removed */
  int fd;
  char *backup;        /* hard link to the old target (sets of several files), or NULL */
  int backup_fd;
} Item;

static void
item_clear (Item *it)
{
  if (it->tmp != NULL)
    (void) g_unlink (it->tmp);
  if (it->fd >= 0)
    close (it->fd);
  if (it->backup != NULL)
    (void) g_unlink (it->backup);
  if (it->backup_fd >= 0)
    close (it->backup_fd);
  g_free (it->target);
  g_free (it->dir);
  g_free (it->base);
  g_free (it->tmp);
  g_free (it->backup);
  memset (it, 0, sizeof *it);
  it->fd = it->backup_fd = -1;
}

static gboolean
item_resolve (Item *it, const char *path, GError **error)
{
  it->fd = it->backup_fd = -1;
  it->shown = path;
  it->target = lw_file_resolve_target (path, error);
  if (it->target == NULL)
    return FALSE;
  it->dir = g_path_get_dirname (it->target);
  it->base = g_path_get_basename (it->target);
  struct stat st;
  if (stat (it->target, &st) == 0)
    {
      if (!S_ISREG (st.st_mode))
        {
          g_set_error (error, G_FILE_ERROR, G_FILE_ERROR_FAILED,
                       "%s: cannot replace it: it exists and is not a regular file", path);
          return FALSE;
        }
      it->existed = TRUE;
      it->mode = st.st_mode & 07777;
    }
  return TRUE;
}

/* Writes the item's bytes to a synced, locked temporary file beside its target. */
static gboolean
item_write_temp (Item *it, const void *data, size_t len, GError **error)
{
  it->fd = create_temp (it->dir, it->base, &it->tmp);
  if (it->fd < 0)
    return fail_errno (error, it->shown, "create a temporary file beside it", errno);
  const char *what = NULL;
  int errsv = 0;
  if (write_all (it->fd, data, len) != 0)
    errsv = errno, what = "write it";
  else if (it->existed && fchmod (it->fd, it->mode) != 0)
    errsv = errno, what = "keep its permissions";
  else if (fsync (it->fd) != 0)
    errsv = errno, what = "flush it to disk";
  if (what != NULL)
    return fail_errno (error, it->shown, what, errsv);
  return TRUE;
}

gboolean
lw_file_replace (const char *path, const void *data, size_t len, GError **error)
{
  LwFileContents f = { path, data, len };
  return lw_files_replace (&f, 1, error);
}

/* ---- the commit journal of a set -------------------------------------------------------- */

static char *
journal_path (const char *dir, const char *base)
{
  g_autofree char *name = g_strdup_printf (".%s.journal", base);
  return g_build_filename (dir, name, NULL);
}

/* Records: temporary \0 target \0 backup-or-empty \0, absolute paths. */
static GString *
journal_text (const Item *items, size_t n)
{
  GString *s = g_string_new (NULL);
  for (size_t i = 0; i < n; i++)
    {
      g_autofree char *t = g_canonicalize_filename (items[i].tmp, NULL);
      g_autofree char *g = g_canonicalize_filename (items[i].target, NULL);
      g_autofree char *b = items[i].backup != NULL ? g_canonicalize_filename (items[i].backup, NULL)
                                                   : g_strdup ("");
      g_string_append_len (s, t, (gssize) strlen (t) + 1);
      g_string_append_len (s, g, (gssize) strlen (g) + 1);
      g_string_append_len (s, b, (gssize) strlen (b) + 1);
    }
  return s;
}

/* Undoes a set: each temporary file still there removed, each target back from its
 * backup, or removed when it was new and already replaced. Idempotent (a backup already
 * moved back is simply not there any more). */
static void
roll_back (char **tmp, char **target, char **backup, size_t n)
{
  for (size_t i = 0; i < n; i++)
    {
      if (tmp[i] != NULL)
        (void) g_unlink (tmp[i]);
      if (backup[i][0] != '\0')
        (void) g_rename (backup[i], target[i]);
      else if (tmp[i] == NULL)
        (void) g_unlink (target[i]);   /* it was new: the set is back to "not there" */
    }
}

gboolean
lw_files_recover (const char *first_path, GError **error)
{
  g_autofree char *first = lw_file_resolve_target (first_path, error);
  if (first == NULL)
    return FALSE;
  g_autofree char *dir = g_path_get_dirname (first);
  g_autofree char *base = g_path_get_basename (first);
  g_autofree char *jpath = journal_path (dir, base);
  int fd = open (jpath, O_RDONLY | O_NOFOLLOW | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0)
    return TRUE;   /* nothing interrupted */
  if (flock (fd, LOCK_EX | LOCK_NB) != 0)
    {
      close (fd);
      g_set_error (error, G_FILE_ERROR, G_FILE_ERROR_AGAIN,
                   "%s: another program is writing it and its companion files right now; try "
                   "again when it is done", first_path);
      return FALSE;
    }
  g_autofree char *text = NULL;
  gsize len = 0;
  gboolean ok = g_file_get_contents (jpath, &text, &len, NULL);
  /* the journal's records; a journal that cannot be read or is cut short names nothing to
   * finish (it is renamed into place only once complete) */
  GPtrArray *f = g_ptr_array_new ();
  for (gsize at = 0; ok && at < len;)
    {
      const char *s = text + at;
      size_t l = strnlen (s, len - at);
      if (at + l >= len)
        break;
      g_ptr_array_add (f, (char *) s);
      at += l + 1;
    }
  size_t n = f->len / 3;
  char **tmp = g_new0 (char *, n + 1), **target = g_new0 (char *, n + 1);
  char **backup = g_new0 (char *, n + 1);
  for (size_t i = 0; i < n; i++)
    {
      struct stat st;
      tmp[i] = lstat (f->pdata[3 * i], &st) == 0 ? f->pdata[3 * i] : NULL;
      target[i] = f->pdata[3 * i + 1];
      backup[i] = f->pdata[3 * i + 2];
    }
  /* complete the commit: every temporary file still there is renamed over its target */
  gboolean done = TRUE;
  int errsv = 0;
  for (size_t i = 0; i < n && done; i++)
    if (tmp[i] != NULL)
      {
        if (g_rename (tmp[i], target[i]) == 0)
          tmp[i] = NULL;
        else
          errsv = errno, done = FALSE;
      }
  if (!done)
    {
      roll_back (tmp, target, backup, n);
      for (size_t i = 0; i < n; i++)
        {
          g_autofree char *d = g_path_get_dirname (target[i]);
          sync_dir (d);
        }
      (void) g_unlink (jpath);
      sync_dir (dir);
      g_set_error (error, G_FILE_ERROR, g_file_error_from_errno (errsv),
                   "%s: an interrupted save of it and its companion files could not be "
                   "completed (%s); the earlier files are back", first_path, g_strerror (errsv));
      ok = FALSE;
    }
  else
    {
      for (size_t i = 0; i < n; i++)
        {
          g_autofree char *d = g_path_get_dirname (target[i]);
          sync_dir (d);
        }
      (void) g_unlink (jpath);
      for (size_t i = 0; i < n; i++)
        if (backup[i][0] != '\0')
          (void) g_unlink (backup[i]);
      sync_dir (dir);
      ok = TRUE;
    }
  g_free (tmp);
  g_free (target);
  g_free (backup);
  g_ptr_array_free (f, TRUE);
  close (fd);
  return ok;
}

/* A hard link to the old target under a fresh ".base.XXXXXX", locked like a temporary file
 * (the lock is on the file, so stale clean-up leaves it alone while we live). */
static gboolean
item_backup (Item *it, GError **error)
{
  for (int attempt = 0; attempt < 100; attempt++)
    {
      char suffix[TEMP_SUFFIX_LEN + 1];
      static const char letters[] =
        "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789";
      for (int k = 0; k < TEMP_SUFFIX_LEN; k++)
        suffix[k] = letters[g_random_int_range (0, (gint32) sizeof letters - 1)];
      suffix[TEMP_SUFFIX_LEN] = '\0';
      g_autofree char *name = g_strdup_printf (".%s.%s", it->base, suffix);
      char *b = g_build_filename (it->dir, name, NULL);
      if (link (it->target, b) == 0)
        {
          it->backup = b;
          it->backup_fd = open (b, O_RDONLY | O_NOFOLLOW | O_CLOEXEC);
          if (it->backup_fd >= 0)
            (void) flock (it->backup_fd, LOCK_EX);
          return TRUE;
        }
      int e = errno;
      g_free (b);
      if (e != EEXIST)
        return fail_errno (error, it->shown, "keep a copy of the old file while replacing it "
                           "(a hard link beside it)", e);
    }
  return fail_errno (error, it->shown, "keep a copy of the old file", EEXIST);
}

static int
test_hook (const char *name)
{
  const char *v = g_getenv (name);
  return v != NULL ? atoi (v) : 0;
}

gboolean
lw_files_replace (const LwFileContents *files, size_t n, GError **error)
{
  g_return_val_if_fail (files != NULL && n >= 1, FALSE);
  Item *items = g_new0 (Item, n);
  for (size_t i = 0; i < n; i++)
    items[i].fd = items[i].backup_fd = -1;
  gboolean ok = FALSE;
  int jfd = -1;
  g_autofree char *jpath = NULL;
  char *jtmp = NULL;

  for (size_t i = 0; i < n; i++)
    if (!item_resolve (&items[i], files[i].path, error))
      goto out;
  for (size_t i = 0; i < n; i++)
    for (size_t j = 0; j < i; j++)
      if (strcmp (items[i].target, items[j].target) == 0)
        {
          g_set_error (error, G_FILE_ERROR, G_FILE_ERROR_INVAL,
                       "%s: it is the same file as %s", files[i].path, files[j].path);
          goto out;
        }
  /* an interrupted earlier set is finished before anything else (several files only) */
  if (n > 1 && !lw_files_recover (files[0].path, error))
    goto out;
  for (size_t i = 0; i < n; i++)
    clean_stale (items[i].dir, items[i].base);

  for (size_t i = 0; i < n; i++)
    if (!item_write_temp (&items[i], files[i].data, files[i].len, error))
      goto out;

  if (n == 1)
    {
      if (g_rename (items[0].tmp, items[0].target) != 0)
        {
          fail_errno (error, files[0].path, "rename the new file over it", errno);
          goto out;
        }
      g_clear_pointer (&items[0].tmp, g_free);
      sync_dir (items[0].dir);
      ok = TRUE;
      goto out;
    }

  /* several files: backups, the journal (the commit point), the renames */
  for (size_t i = 0; i < n; i++)
    if (items[i].existed && !item_backup (&items[i], error))
      goto out;
  {
    jpath = journal_path (items[0].dir, items[0].base);
    GString *text = journal_text (items, n);
    jfd = create_temp (items[0].dir, items[0].base, &jtmp);
    int errsv = 0;
    if (jfd < 0 || write_all (jfd, text->str, text->len) != 0 || fsync (jfd) != 0
        || g_rename (jtmp, jpath) != 0)
      errsv = errno;
    g_string_free (text, TRUE);
    if (errsv != 0)
      {
        if (jtmp != NULL)
          (void) g_unlink (jtmp);
        fail_errno (error, files[0].path, "write the commit journal beside it", errsv);
        goto out;
      }
    sync_dir (items[0].dir);
  }
  /* Test hooks (tests/doc): LW_TEST_FAIL_RENAME=k makes the k-th rename of a set fail with
   * EIO; LW_TEST_KILL_AFTER_RENAME=k kills the process with SIGKILL right after it. */
  int fail_at = test_hook ("LW_TEST_FAIL_RENAME"), kill_at = test_hook ("LW_TEST_KILL_AFTER_RENAME");
  for (size_t i = 0; i < n; i++)
    {
      int rc = (int) i + 1 == fail_at ? (errno = EIO, -1) : g_rename (items[i].tmp, items[i].target);
      if (rc == 0)
        {
          g_clear_pointer (&items[i].tmp, g_free);
          if ((int) i + 1 == kill_at)
            raise (SIGKILL);
          continue;
        }
      int errsv = errno;
      /* back to the old set: the targets already replaced from their backups, or removed
       * when they were new; the temporary files go in item_clear */
      for (size_t j = 0; j < i; j++)
        {
          if (items[j].backup != NULL)
            (void) g_rename (items[j].backup, items[j].target);
          else
            (void) g_unlink (items[j].target);
          g_clear_pointer (&items[j].backup, g_free);
        }
      for (size_t j = 0; j < n; j++)
        sync_dir (items[j].dir);
      (void) g_unlink (jpath);
      sync_dir (items[0].dir);
      fail_errno (error, files[i].path, "replace it", errsv);
      goto out;
    }
  for (size_t i = 0; i < n; i++)
    sync_dir (items[i].dir);
  (void) g_unlink (jpath);
  ok = TRUE;   /* item_clear removes the backups */

out:
  if (jfd >= 0)
    close (jfd);
  g_free (jtmp);
  for (size_t i = 0; i < n; i++)
    item_clear (&items[i]);
  g_free (items);
  return ok;
}
