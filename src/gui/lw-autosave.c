/* lw-autosave.c — unsaved work kept on disk, one file per window (see lw-autosave.h).
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include "config.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/file.h>
#include <unistd.h>

#include <glib/gstdio.h>

#include "lw-autosave.h"

typedef struct
{
  guint id;
  gpointer owner;               /* NULL once removed */
  LwAutosaveAskFunc ask;
  LwDesign *last;               /* what its files hold, or NULL: no files */
  char *last_uri;
} Slot;

/* A session of a process that ended, locked by this one while its work is offered. */
typedef struct
{
  char *dir;
  int lock_fd;                  /* −1: none (the files of earlier versions) */
} DeadSession;

struct _LwAutosave
{
  GObject parent_instance;

  char *dir;                    /* …/autosave */
  char *session_dir;            /* …/autosave/SESSION */
  int lock_fd;
  guint timer;
  GPtrArray *slots;             /* of Slot * */
  guint next_slot;
  GPtrArray *dead;              /* of DeadSession *, while offered */
  gboolean debug;
};

G_DEFINE_FINAL_TYPE (LwAutosave, lw_autosave, G_TYPE_OBJECT)

static void
slot_free (gpointer data)
{
  Slot *s = data;
  g_clear_pointer (&s->last, lw_design_free);
  g_free (s->last_uri);
  g_free (s);
}

static void
dead_session_free (gpointer data)
{
  DeadSession *d = data;
  if (d->lock_fd >= 0)
    close (d->lock_fd);
  g_free (d->dir);
  g_free (d);
}

static char *
slot_path (LwAutosave *self, guint id, const char *ext)
{
  g_autofree char *name = g_strdup_printf ("%u.%s", id, ext);
  return g_build_filename (self->session_dir, name, NULL);
}

static Slot *
find_slot (LwAutosave *self, guint id)
{
  for (guint i = 0; i < self->slots->len; i++)
    {
      Slot *s = self->slots->pdata[i];
      if (s->id == id)
        return s;
    }
  return NULL;
}

/* Whether dir holds a document (NAME.lwd, not a temporary .NAME.lwd.XXXXXX). */
static gboolean
has_documents (const char *dir)
{
  g_autoptr (GDir) d = g_dir_open (dir, 0, NULL);
  const char *name;
  while (d != NULL && (name = g_dir_read_name (d)) != NULL)
    if (name[0] != '.' && g_str_has_suffix (name, ".lwd"))
      return TRUE;
  return FALSE;
}

/* Removes a session directory without documents: its files, the lock last, the directory.
 * The caller holds the lock. */
static void
remove_session_dir (const char *dir)
{
  g_autoptr (GDir) d = g_dir_open (dir, 0, NULL);
  const char *name;
  while (d != NULL && (name = g_dir_read_name (d)) != NULL)
    if (strcmp (name, "lock") != 0)
      {
        g_autofree char *p = g_build_filename (dir, name, NULL);
        g_unlink (p);
      }
  g_autofree char *lock = g_build_filename (dir, "lock", NULL);
  g_unlink (lock);
  g_rmdir (dir);
}

/* Opens and locks dir/lock (created when missing); −1 when another process holds it. */
static int
take_lock (const char *dir, GError **error)
{
  g_autofree char *path = g_build_filename (dir, "lock", NULL);
  int fd = open (path, O_RDWR | O_CREAT | O_CLOEXEC, 0600);
  if (fd < 0)
    {
      int errsv = errno;
      g_set_error (error, G_IO_ERROR, g_io_error_from_errno (errsv), "%s: %s", path,
                   g_strerror (errsv));
      return -1;
    }
  if (flock (fd, LOCK_EX | LOCK_NB) != 0)
    {
      int errsv = errno;
      g_set_error (error, G_IO_ERROR, g_io_error_from_errno (errsv), "%s: %s", path,
                   errsv == EWOULDBLOCK ? "held by a running process" : g_strerror (errsv));
      close (fd);
      return -1;
    }
  return fd;
}

/* ---- a window's work ------------------------------------------------------------------------ */

static void
slot_clear (LwAutosave *self, Slot *s)
{
  if (s->last == NULL)
    return;
  g_autofree char *path = slot_path (self, s->id, "lwd");
  g_autofree char *meta = slot_path (self, s->id, "source");
  g_unlink (path);
  g_unlink (meta);
  g_clear_pointer (&s->last, lw_design_free);
  g_clear_pointer (&s->last_uri, g_free);
  if (self->debug)
    {
      printf ("LW-AUTOSAVE event=removed slot=%u path=%s\n", s->id, path);
      fflush (stdout);
    }
}

/* Writes d (from source, may be NULL) as the slot's files unless they hold it already. */
static gboolean
slot_write (LwAutosave *self, Slot *s, const LwDesign *d, GFile *source, GError **error)
{
  g_autofree char *uri = source != NULL ? g_file_get_uri (source) : g_strdup ("");
  if (s->last != NULL && g_strcmp0 (uri, s->last_uri) == 0 && lw_design_equal (s->last, d))
    return TRUE;
  g_autofree char *path = slot_path (self, s->id, "lwd");
  g_autofree char *meta = slot_path (self, s->id, "source");
  /* the source first: a document is only ever beside the record of where it came from */
  if (!g_file_set_contents_full (meta, uri, -1, G_FILE_SET_CONTENTS_CONSISTENT, 0600, error)
      || !lw_design_save_file (d, path, error))
    return FALSE;
  g_clear_pointer (&s->last, lw_design_free);
  s->last = lw_design_copy (d);
  g_free (s->last_uri);
  s->last_uri = g_steal_pointer (&uri);
  if (self->debug)
    {
      printf ("LW-AUTOSAVE event=wrote slot=%u path=%s source=%s\n", s->id, path,
              s->last_uri[0] != '\0' ? s->last_uri : "-");
      fflush (stdout);
    }
  return TRUE;
}

static void
ask_slot (LwAutosave *self, Slot *s)
{
  if (s->owner == NULL)
    return;
  GFile *source = NULL;
  gboolean later = FALSE;
  const LwDesign *d = s->ask (s->owner, &source, &later);
  if (later)
    return;
  if (d == NULL)
    {
      slot_clear (self, s);
      return;
    }
  g_autoptr (GError) error = NULL;
  if (!slot_write (self, s, d, source, &error))
    g_warning ("autosave: %s", error->message);
}

void
lw_autosave_write_all (LwAutosave *self)
{
  g_return_if_fail (LW_IS_AUTOSAVE (self));
  for (guint i = 0; i < self->slots->len; i++)
    ask_slot (self, self->slots->pdata[i]);
}

static gboolean
autosave_tick (gpointer user_data)
{
  lw_autosave_write_all (LW_AUTOSAVE (user_data));
  return G_SOURCE_CONTINUE;
}

guint
lw_autosave_add (LwAutosave *self, gpointer owner, LwAutosaveAskFunc ask)
{
  g_return_val_if_fail (LW_IS_AUTOSAVE (self), 0);
  g_return_val_if_fail (owner != NULL && ask != NULL, 0);
  Slot *s = g_new0 (Slot, 1);
  s->id = ++self->next_slot;
  s->owner = owner;
  s->ask = ask;
  g_ptr_array_add (self->slots, s);
  return s->id;
}

void
lw_autosave_remove (LwAutosave *self, guint slot)
{
  g_return_if_fail (LW_IS_AUTOSAVE (self));
  Slot *s = find_slot (self, slot);
  if (s == NULL)
    return;
  if (s->last == NULL)
    g_ptr_array_remove (self->slots, s);
  else
    s->owner = NULL;   /* unsaved work outlives its window only when the window did not close */
}

void
lw_autosave_clear (LwAutosave *self, guint slot)
{
  g_return_if_fail (LW_IS_AUTOSAVE (self));
  Slot *s = find_slot (self, slot);
  if (s != NULL)
    slot_clear (self, s);
}

/* ---- the work of processes that ended ------------------------------------------------------- */

static void
stale_free (gpointer data)
{
  LwAutosaveStale *s = data;
  g_free (s->path);
  g_free (s->source_uri);
  g_free (s->meta_path);
  g_free (s);
}

/* Adds the stale document path (with its source record meta) to out. */
static void
add_stale (GPtrArray *out, const char *path, const char *meta, DeadSession *session)
{
  GStatBuf st;
  if (g_stat (path, &st) != 0)
    return;
  LwAutosaveStale *s = g_new0 (LwAutosaveStale, 1);
  s->path = g_strdup (path);
  s->meta_path = g_strdup (meta);
  s->mtime_s = st.st_mtime;
  s->session = session;
  g_autofree char *uri = NULL;
  if (g_file_get_contents (meta, &uri, NULL, NULL) && uri[0] != '\0')
    {
      g_strchomp (uri);
      s->source_uri = g_steal_pointer (&uri);
      g_autoptr (GFile) source = g_file_new_for_uri (s->source_uri);
      const char *sp = g_file_peek_path (source);
      GStatBuf sst;
      s->source_newer = sp != NULL && g_stat (sp, &sst) == 0 && sst.st_mtime > st.st_mtime;
    }
  g_ptr_array_add (out, s);
}

static int
stale_older (gconstpointer a, gconstpointer b)
{
  const LwAutosaveStale *x = *(LwAutosaveStale *const *) a;
  const LwAutosaveStale *y = *(LwAutosaveStale *const *) b;
  if (x->mtime_s != y->mtime_s)
    return x->mtime_s < y->mtime_s ? -1 : 1;
  return strcmp (x->path, y->path);
}

GPtrArray *
lw_autosave_find_stale (LwAutosave *self)
{
  g_return_val_if_fail (LW_IS_AUTOSAVE (self), NULL);
  GPtrArray *out = g_ptr_array_new_with_free_func (stale_free);
  g_autofree char *own = g_path_get_basename (self->session_dir);
  g_autoptr (GDir) d = g_dir_open (self->dir, 0, NULL);
  const char *name;
  while (d != NULL && (name = g_dir_read_name (d)) != NULL)
    {
      g_autofree char *sdir = g_build_filename (self->dir, name, NULL);
      if (name[0] == '.' || strcmp (name, own) == 0 || !g_file_test (sdir, G_FILE_TEST_IS_DIR))
        continue;
      int fd = take_lock (sdir, NULL);
      if (fd < 0)
        continue;   /* a running process's, or being offered by one */
      if (!has_documents (sdir))
        {
          remove_session_dir (sdir);
          close (fd);
          continue;
        }
      DeadSession *ds = g_new0 (DeadSession, 1);
      ds->dir = g_steal_pointer (&sdir);
      ds->lock_fd = fd;
      g_ptr_array_add (self->dead, ds);
      g_autoptr (GDir) sd = g_dir_open (ds->dir, 0, NULL);
      const char *doc;
      while (sd != NULL && (doc = g_dir_read_name (sd)) != NULL)
        if (doc[0] != '.' && g_str_has_suffix (doc, ".lwd"))
          {
            g_autofree char *path = g_build_filename (ds->dir, doc, NULL);
            g_autofree char *stem = g_strndup (doc, strlen (doc) - strlen (".lwd"));
            g_autofree char *meta_name = g_strconcat (stem, ".source", NULL);
            g_autofree char *meta = g_build_filename (ds->dir, meta_name, NULL);
            add_stale (out, path, meta, ds);
          }
    }

  /* the one autosave of earlier versions, beside the directory */
  g_autofree char *parent = g_path_get_dirname (self->dir);
  g_autofree char *legacy = g_build_filename (parent, "autosave.lwd", NULL);
  g_autofree char *legacy_meta = g_build_filename (parent, "autosave.source", NULL);
  if (g_file_test (legacy, G_FILE_TEST_IS_REGULAR))
    add_stale (out, legacy, legacy_meta, NULL);

  g_ptr_array_sort (out, stale_older);
  if (self->debug)
    {
      GString *line = g_string_new (NULL);
      g_string_printf (line, "LW-AUTOSAVE event=stale n=%u", out->len);
      for (guint i = 0; i < out->len; i++)
        g_string_append_printf (line, "%s%s", i == 0 ? " paths=" : ",",
                                ((LwAutosaveStale *) out->pdata[i])->path);
      printf ("%s\n", line->str);
      fflush (stdout);
      g_string_free (line, TRUE);
    }
  return out;
}

void
lw_autosave_discard (LwAutosave *self, LwAutosaveStale *stale)
{
  g_return_if_fail (LW_IS_AUTOSAVE (self));
  g_return_if_fail (stale != NULL);
  g_unlink (stale->path);
  g_unlink (stale->meta_path);
  if (self->debug)
    {
      printf ("LW-AUTOSAVE event=discarded path=%s\n", stale->path);
      fflush (stdout);
    }
}

gboolean
lw_autosave_adopt (LwAutosave *self, LwAutosaveStale *stale, guint slot,
                   const LwDesign *design, GError **error)
{
  g_return_val_if_fail (LW_IS_AUTOSAVE (self), FALSE);
  g_return_val_if_fail (stale != NULL && design != NULL, FALSE);
  Slot *s = find_slot (self, slot);
  g_return_val_if_fail (s != NULL, FALSE);
  g_autoptr (GFile) source = stale->source_uri != NULL ? g_file_new_for_uri (stale->source_uri)
                                                       : NULL;
  if (!slot_write (self, s, design, source, error))
    return FALSE;
  g_unlink (stale->path);
  g_unlink (stale->meta_path);
  if (self->debug)
    {
      printf ("LW-AUTOSAVE event=adopted slot=%u from=%s\n", s->id, stale->path);
      fflush (stdout);
    }
  return TRUE;
}

void
lw_autosave_release_stale (LwAutosave *self)
{
  g_return_if_fail (LW_IS_AUTOSAVE (self));
  for (guint i = 0; i < self->dead->len; i++)
    {
      DeadSession *ds = self->dead->pdata[i];
      if (!has_documents (ds->dir))
        remove_session_dir (ds->dir);
    }
  g_ptr_array_set_size (self->dead, 0);
}

/* ---- life cycle ----------------------------------------------------------------------------- */

char *
lw_autosave_default_dir (void)
{
  return g_build_filename (g_get_user_state_dir (), "loopwright", "autosave", NULL);
}

static void
lw_autosave_dispose (GObject *object)
{
  LwAutosave *self = LW_AUTOSAVE (object);

  g_clear_handle_id (&self->timer, g_source_remove);
  if (self->dead != NULL)
    lw_autosave_release_stale (self);
  /* a clean end: the session goes, unless some work was left unsaved */
  if (self->lock_fd >= 0)
    {
      if (!has_documents (self->session_dir))
        remove_session_dir (self->session_dir);
      close (self->lock_fd);
      self->lock_fd = -1;
    }
  G_OBJECT_CLASS (lw_autosave_parent_class)->dispose (object);
}

static void
lw_autosave_finalize (GObject *object)
{
  LwAutosave *self = LW_AUTOSAVE (object);

  g_ptr_array_unref (self->slots);
  g_ptr_array_unref (self->dead);
  g_free (self->dir);
  g_free (self->session_dir);
  G_OBJECT_CLASS (lw_autosave_parent_class)->finalize (object);
}

static void
lw_autosave_class_init (LwAutosaveClass *klass)
{
  G_OBJECT_CLASS (klass)->dispose = lw_autosave_dispose;
  G_OBJECT_CLASS (klass)->finalize = lw_autosave_finalize;
}

static void
lw_autosave_init (LwAutosave *self)
{
  self->lock_fd = -1;
  self->slots = g_ptr_array_new_with_free_func (slot_free);
  self->dead = g_ptr_array_new_with_free_func (dead_session_free);
  self->debug = g_strcmp0 (g_getenv ("LW_DEBUG_HANDLES"), "1") == 0;
}

LwAutosave *
lw_autosave_new (const char *dir, guint interval_ms, GError **error)
{
  g_return_val_if_fail (dir != NULL, NULL);
  g_return_val_if_fail (interval_ms > 0, NULL);

  if (g_mkdir_with_parents (dir, 0700) != 0)
    {
      int errsv = errno;
      g_set_error (error, G_IO_ERROR, g_io_error_from_errno (errsv), "%s: %s", dir,
                   g_strerror (errsv));
      return NULL;
    }
  /* made and locked under a hidden name, then renamed: a finder never sees it unlocked */
  /* random, and the process id in it too: a forked child starts from its parent's random
   * state */
  g_autofree char *uuid = g_uuid_string_random ();
  g_autofree char *session = g_strdup_printf ("%ld-%s", (long) getpid (), uuid);
  g_autofree char *hidden_name = g_strconcat (".", session, NULL);
  g_autofree char *hidden = g_build_filename (dir, hidden_name, NULL);
  g_autofree char *final = g_build_filename (dir, session, NULL);
  if (g_mkdir (hidden, 0700) != 0)
    {
      int errsv = errno;
      g_set_error (error, G_IO_ERROR, g_io_error_from_errno (errsv), "%s: %s", hidden,
                   g_strerror (errsv));
      return NULL;
    }
  int fd = take_lock (hidden, error);
  if (fd < 0)
    {
      g_rmdir (hidden);
      return NULL;
    }
  if (g_rename (hidden, final) != 0)
    {
      int errsv = errno;
      g_set_error (error, G_IO_ERROR, g_io_error_from_errno (errsv), "%s: %s", final,
                   g_strerror (errsv));
      remove_session_dir (hidden);
      close (fd);
      return NULL;
    }

  LwAutosave *self = g_object_new (LW_TYPE_AUTOSAVE, NULL);
  self->dir = g_strdup (dir);
  self->session_dir = g_steal_pointer (&final);
  self->lock_fd = fd;
  self->timer = interval_ms % 1000 == 0
                  ? g_timeout_add_seconds (interval_ms / 1000, autosave_tick, self)
                  : g_timeout_add (interval_ms, autosave_tick, self);
  return self;
}
