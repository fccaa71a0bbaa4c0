/* lw-file-write.h — files written whole or not at all: design documents, figures, reports
 * and the pair of emitted C files (GLib + POSIX; no libxml2, so the renderer links it too).
 *
 * One file (lw_file_replace): the bytes go to a hidden temporary file beside the target,
 * ".NAME.XXXXXX" (XXXXXX: six letters or digits), which is locked (flock) while it is
 * written, flushed to disk (fsync), given the old file's permissions and renamed over the
 * target; then the directory is synced. A failure or a kill at any moment leaves the old
 * file or the new one, never a mix.
 *
 * A symbolic link is followed: the file it points to (through any chain of links, relative
 * targets taken from the link's own directory) is replaced, and the link stays a link.
 *
 * Several files (lw_files_replace, e.g. a .h and its .c): all or none.
 *  1. every new file is written to its temporary file and synced (a failure: the temporary
 *     files are removed and the old files are untouched);
 *  2. each existing target gets a hard-linked backup ".NAME.XXXXXX";
 *  3. a commit journal ".FIRST.journal" beside the first target lists "temporary -> target"
 *     for each file; it is written to a temporary file, synced and renamed into place, and
 *     stays locked: its rename is the commit point;
 *  4. the temporary files are renamed over the targets in turn; if a rename fails, the
 *     targets already replaced are restored from their backups (or removed when there was
 *     no old file), so the old set is back;
 *  5. the journal and the backups are removed.
 * A kill -9 before step 3 leaves the old set; after it, the set on disk can be mixed only
 * between two rename() calls (POSIX has no rename of several names at once), and the next
 * lw_files_replace of the same first target finds the unlocked journal and completes the
 * commit (renames the temporary files that are still there) before anything else, which
 * gives the new set. lw_files_recover does only that.
 *
 * Stale temporary files of interrupted saves are removed by the next save of the same
 * target. A file in the target's directory is ours and stale when all of these hold:
 *  - its name is ".NAME.XXXXXX" for the target's NAME (six letters or digits, as
 *    g_mkstemp makes them) — nothing else in the directory is ever touched;
 *  - it is a regular file (not a link) owned by the user who saves;
 *  - it was last modified more than LW_FILE_STALE_SECONDS ago;
 *  - no process holds its lock: every writer keeps an flock on its temporary file from
 *    creating it until the rename (a lock dies with its process, kill -9 included), so a
 *    lock that can be taken means nobody is writing it.
 *
 * Errors are G_FILE_ERROR, with a message that names the target as the caller gave it
 * ("PATH: cannot …: reason"), never the temporary file.
 *
 * SPDX-License-Identifier: GPL-3.0-or-later
 */
#pragma once

#include <stddef.h>

#include <glib.h>

G_BEGIN_DECLS

#define LW_FILE_STALE_SECONDS (10 * 60)

typedef struct
{
  const char *path;   /* the target as the user named it */
  const void *data;
  size_t len;
} LwFileContents;

/* Replaces one file atomically (see top). New files get 0666 less the umask; an existing
 * file's permission bits are kept. */
gboolean lw_file_replace (const char *path, const void *data, size_t len, GError **error);

/* Replaces n >= 1 files as a set: all or none (see top). */
gboolean lw_files_replace (const LwFileContents *files, size_t n, GError **error);

/* Completes an interrupted lw_files_replace whose first target is first_path, if its
 * commit journal is there and no live process holds it. TRUE when there was nothing to do
 * or the commit was completed. */
gboolean lw_files_recover (const char *first_path, GError **error);

/* The file a path names after following symbolic links (a new g_free string; the path
 * itself when it is not a link or does not exist). NULL with an error for a loop of links. */
char *lw_file_resolve_target (const char *path, GError **error);

G_END_DECLS
