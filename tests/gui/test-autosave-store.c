/* test-autosave-store.c — LwAutosave (src/gui/lw-autosave.c) without a window: one file per
 * slot, a slot's files removed only by its own clear, a live session never stale, a process
 * that ended without cleaning up (a child that _exit()s, as after kill -9: no dispose runs,
 * the kernel drops its lock) found stale with the file its work came from, adopted byte for
 * byte, a stale session offered by one finder at a time, empty dead sessions removed.
 *
 * Usage: test-autosave-store EXAMPLE.lwd
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include <stdlib.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>

#include <glib/gstdio.h>

#include "lw-autosave.h"

static const char *example_path;

/* What a slot's owner answers: its document (NULL: nothing unsaved) and its file. */
typedef struct
{
  const LwDesign *design;
  GFile *source;
  gboolean later;
} Owner;

static const LwDesign *
ask (gpointer owner, GFile **source, gboolean *later)
{
  Owner *o = owner;
  *source = o->source;
  *later = o->later;
  return o->design;
}

typedef struct
{
  char *dir;                    /* the autosave directory, in a fresh temporary one */
  char *tmp;
  LwDesign *a, *b;              /* two different documents */
} Fixture;

static int
setup (void **state)
{
  Fixture *f = g_new0 (Fixture, 1);
  f->tmp = g_dir_make_tmp ("lw-autosave-XXXXXX", NULL);
  assert_non_null (f->tmp);
  f->dir = g_build_filename (f->tmp, "autosave", NULL);
  GError *error = NULL;
  f->a = lw_design_load_file (example_path, &error);
  assert_non_null (f->a);
  f->b = lw_design_copy (f->a);
  lw_design_set_string (&f->b->title, "another title");
  assert_false (lw_design_equal (f->a, f->b));
  *state = f;
  return 0;
}

static void
remove_tree (const char *path)
{
  if (g_file_test (path, G_FILE_TEST_IS_DIR))
    {
      GDir *d = g_dir_open (path, 0, NULL);
      const char *name;
      while (d != NULL && (name = g_dir_read_name (d)) != NULL)
        {
          char *p = g_build_filename (path, name, NULL);
          remove_tree (p);
          g_free (p);
        }
      if (d != NULL)
        g_dir_close (d);
      g_rmdir (path);
    }
  else
    g_unlink (path);
}

static int
teardown (void **state)
{
  Fixture *f = *state;
  remove_tree (f->tmp);
  lw_design_free (f->a);
  lw_design_free (f->b);
  g_free (f->dir);
  g_free (f->tmp);
  g_free (f);
  return 0;
}

static LwAutosave *
new_autosave (Fixture *f)
{
  GError *error = NULL;
  /* an hour: rounds only through lw_autosave_write_all here */
  LwAutosave *s = lw_autosave_new (f->dir, 3600 * 1000, &error);
  if (error != NULL)
    fail_msg ("%s", error->message);
  assert_non_null (s);
  return s;
}

static char *
read_text (const char *path)
{
  char *text = NULL;
  assert_true (g_file_get_contents (path, &text, NULL, NULL));
  return text;
}

/* The documents (NAME.lwd) under dir, one level of session directories down. */
static guint
count_documents (const char *dir)
{
  guint n = 0;
  GDir *d = g_dir_open (dir, 0, NULL);
  const char *name;
  while (d != NULL && (name = g_dir_read_name (d)) != NULL)
    {
      char *sub = g_build_filename (dir, name, NULL);
      GDir *sd = g_dir_open (sub, 0, NULL);
      const char *doc;
      while (sd != NULL && (doc = g_dir_read_name (sd)) != NULL)
        n += doc[0] != '.' && g_str_has_suffix (doc, ".lwd");
      if (sd != NULL)
        g_dir_close (sd);
      g_free (sub);
    }
  if (d != NULL)
    g_dir_close (d);
  return n;
}

static guint
count_entries (const char *dir)
{
  guint n = 0;
  GDir *d = g_dir_open (dir, 0, NULL);
  while (d != NULL && g_dir_read_name (d) != NULL)
    n++;
  if (d != NULL)
    g_dir_close (d);
  return n;
}

/* Two windows' work: two files; clearing one (its window saved) leaves the other as it was —
 * the defect of the single shared autosave file. */
static void
test_one_file_per_slot (void **state)
{
  Fixture *f = *state;
  LwAutosave *s = new_autosave (f);
  GFile *file = g_file_new_for_path ("/nowhere/pump.lwd");
  Owner oa = { f->a, file, FALSE }, ob = { f->b, NULL, FALSE };
  guint sa = lw_autosave_add (s, &oa, ask), sb = lw_autosave_add (s, &ob, ask);
  assert_int_not_equal (sa, sb);
  lw_autosave_write_all (s);
  assert_int_equal (count_documents (f->dir), 2);

  /* the other process's view: nothing stale while this one lives */
  LwAutosave *other = new_autosave (f);
  GPtrArray *stale = lw_autosave_find_stale (other);
  assert_int_equal (stale->len, 0);
  g_ptr_array_unref (stale);
  lw_autosave_release_stale (other);
  g_object_unref (other);

  lw_autosave_clear (s, sa);   /* its window saved: nothing unsaved there now */
  oa.design = NULL;
  assert_int_equal (count_documents (f->dir), 1);
  /* nothing unsaved any more (undone back to the saved state): the slot's file goes too */
  ob.design = NULL;
  lw_autosave_write_all (s);
  assert_int_equal (count_documents (f->dir), 0);
  lw_autosave_remove (s, sa);
  lw_autosave_remove (s, sb);
  g_object_unref (s);
  /* a clean end leaves no session behind */
  assert_int_equal (count_entries (f->dir), 0);
  g_object_unref (file);
}

/* A child process keeps two documents and ends without any cleanup. */
static void
crash_with_work (Fixture *f, const char *source_path)
{
  pid_t pid = fork ();
  assert_true (pid >= 0);
  if (pid == 0)
    {
      GError *error = NULL;
      LwAutosave *s = lw_autosave_new (f->dir, 3600 * 1000, &error);
      GFile *file = source_path != NULL ? g_file_new_for_path (source_path) : NULL;
      Owner oa = { f->a, file, FALSE }, ob = { f->b, NULL, FALSE };
      if (s == NULL)
        _exit (3);
      lw_autosave_add (s, &oa, ask);
      lw_autosave_add (s, &ob, ask);
      lw_autosave_write_all (s);
      _exit (0);   /* no dispose, no unlock: as after kill -9 */
    }
  int status = 0;
  assert_int_equal (waitpid (pid, &status, 0), pid);
  assert_true (WIFEXITED (status) && WEXITSTATUS (status) == 0);
}

static void
test_crash_offers_each (void **state)
{
  Fixture *f = *state;
  char *source = g_build_filename (f->tmp, "pump.lwd", NULL);
  crash_with_work (f, source);
  assert_int_equal (count_documents (f->dir), 2);

  LwAutosave *s = new_autosave (f);
  GPtrArray *stale = lw_autosave_find_stale (s);
  assert_int_equal (stale->len, 2);
  /* while this process offers them, another finder does not offer them again */
  LwAutosave *other = new_autosave (f);
  GPtrArray *none = lw_autosave_find_stale (other);
  assert_int_equal (none->len, 0);
  g_ptr_array_unref (none);
  lw_autosave_release_stale (other);

  char *uri = g_filename_to_uri (source, NULL, NULL);
  guint with_source = 0;
  for (guint i = 0; i < stale->len; i++)
    {
      LwAutosaveStale *st = stale->pdata[i];
      if (st->source_uri != NULL)
        {
          assert_string_equal (st->source_uri, uri);
          with_source++;
        }
    }
  assert_int_equal (with_source, 1);

  /* restore the one with a source into a slot of this process: the same bytes, moved */
  LwAutosaveStale *st = ((LwAutosaveStale *) stale->pdata[0])->source_uri != NULL
                          ? stale->pdata[0] : stale->pdata[1];
  char *before = read_text (st->path);
  char *old_path = g_strdup (st->path);
  GError *error = NULL;
  LwDesign *loaded = lw_design_load_file (st->path, &error);
  assert_non_null (loaded);
  Owner o = { loaded, NULL, FALSE };
  guint slot = lw_autosave_add (s, &o, ask);
  assert_true (lw_autosave_adopt (s, st, slot, loaded, &error));
  assert_false (g_file_test (old_path, G_FILE_TEST_EXISTS));
  assert_int_equal (count_documents (f->dir), 2);   /* the other stale one, and the adopted */

  /* "Later" for the other: it stays, and the next process offers it again */
  lw_autosave_release_stale (s);
  GPtrArray *again = lw_autosave_find_stale (other);
  assert_int_equal (again->len, 1);
  assert_null (((LwAutosaveStale *) again->pdata[0])->source_uri);
  lw_autosave_discard (other, again->pdata[0]);
  g_ptr_array_unref (again);
  lw_autosave_release_stale (other);
  g_object_unref (other);
  /* discarded and emptied: the dead session is gone; only this process's remains */
  assert_int_equal (count_entries (f->dir), 1);

  /* the adopted work was written from the loaded document: canonical text, the same bytes */
  GDir *d = g_dir_open (f->dir, 0, NULL);
  char *session = g_build_filename (f->dir, g_dir_read_name (d), NULL);
  g_dir_close (d);
  char *adopted_path = g_strdup_printf ("%s/%u.lwd", session, slot);
  char *after = read_text (adopted_path);
  assert_string_equal (before, after);

  lw_autosave_clear (s, slot);
  lw_autosave_remove (s, slot);
  g_object_unref (s);
  assert_int_equal (count_entries (f->dir), 0);
  lw_design_free (loaded);
  g_ptr_array_unref (stale);
  g_free (before);
  g_free (after);
  g_free (old_path);
  g_free (adopted_path);
  g_free (session);
  g_free (uri);
  g_free (source);
}

/* A process that ended with nothing unsaved leaves an empty session: removed, not offered. */
static void
test_empty_dead_session (void **state)
{
  Fixture *f = *state;
  pid_t pid = fork ();
  assert_true (pid >= 0);
  if (pid == 0)
    _exit (lw_autosave_new (f->dir, 1000, NULL) != NULL ? 0 : 3);
  int status = 0;
  assert_int_equal (waitpid (pid, &status, 0), pid);
  assert_true (WIFEXITED (status) && WEXITSTATUS (status) == 0);
  assert_int_equal (count_entries (f->dir), 1);

  LwAutosave *s = new_autosave (f);
  GPtrArray *stale = lw_autosave_find_stale (s);
  assert_int_equal (stale->len, 0);
  g_ptr_array_unref (stale);
  lw_autosave_release_stale (s);
  assert_int_equal (count_entries (f->dir), 1);   /* this process's own */
  g_object_unref (s);
  assert_int_equal (count_entries (f->dir), 0);
}

/* A slot whose owner says "not now" (a drag) keeps its file as it was. */
static void
test_later_keeps (void **state)
{
  Fixture *f = *state;
  LwAutosave *s = new_autosave (f);
  Owner o = { f->a, NULL, FALSE };
  guint slot = lw_autosave_add (s, &o, ask);
  lw_autosave_write_all (s);
  assert_int_equal (count_documents (f->dir), 1);
  o.design = NULL;
  o.later = TRUE;
  lw_autosave_write_all (s);
  assert_int_equal (count_documents (f->dir), 1);
  /* a window that goes without closing (no clear) leaves its work for the next start */
  lw_autosave_remove (s, slot);
  g_object_unref (s);
  assert_int_equal (count_documents (f->dir), 1);
  LwAutosave *next = new_autosave (f);
  GPtrArray *stale = lw_autosave_find_stale (next);
  assert_int_equal (stale->len, 1);
  g_ptr_array_unref (stale);
  lw_autosave_release_stale (next);
  g_object_unref (next);
}

int
main (int argc, char **argv)
{
  if (argc != 2)
    {
      g_printerr ("usage: test-autosave-store EXAMPLE.lwd\n");
      return 2;
    }
  example_path = argv[1];
  const struct CMUnitTest tests[] = {
    cmocka_unit_test_setup_teardown (test_one_file_per_slot, setup, teardown),
    cmocka_unit_test_setup_teardown (test_crash_offers_each, setup, teardown),
    cmocka_unit_test_setup_teardown (test_empty_dead_session, setup, teardown),
    cmocka_unit_test_setup_teardown (test_later_keeps, setup, teardown),
  };
  return cmocka_run_group_tests (tests, NULL, NULL);
}
