;;; drive.el --- drive Emacs + eglot against notelsp in batch, write what Emacs saw as JSON  -*- lexical-binding: t; -*-

;; Inputs from the environment: NOTELSP_EDITORS (editors/emacs), NOTELSP_CMD (JSON list),
;; NOTELSP_NOTE (the note to open), NOTELSP_OUT (result file).
;; Run by tests/server/test_emacs_client.py: emacs --batch -l drive.el

(require 'json)
(require 'cl-lib)

(defvar drive-result nil "Alist written to NOTELSP_OUT as JSON.")

(defun drive-put (key value)
  (setq drive-result (cons (cons key value) (assq-delete-all key drive-result))))

(defun drive-finish ()
  (with-temp-file (getenv "NOTELSP_OUT")
    (insert (json-encode drive-result)))
  (kill-emacs 0))

(defun drive-idle ()
  "Run the idle timers, as Emacs does when the user stops typing (batch Emacs is never idle).
eglot sends buffer changes to the server from one of them."
  (dolist (timer (copy-sequence timer-idle-list))
    (timer-event-handler timer)))

(defun drive-wait (predicate seconds)
  "Let Emacs read the server and be idle until PREDICATE is true or SECONDS pass."
  (let ((deadline (+ (float-time) seconds)) value)
    (while (and (not (setq value (funcall predicate))) (< (float-time) deadline))
      (accept-process-output nil 0.05)
      (drive-idle)
      (when (bound-and-true-p flymake-mode) (flymake-start)))
    value))

(defun drive-diagnostics ()
  "What Flymake holds for the buffer, each with the LSP diagnostic eglot kept beside it.
Line and text are nil while an edit has left a diagnostic's old positions beyond the text."
  (mapcar (lambda (diagnostic)
            (let ((lsp (cdr (assq 'eglot-lsp-diag (flymake-diagnostic-data diagnostic)))))
              `((code . ,(plist-get lsp :code))
                (source . ,(plist-get lsp :source))
                (href . ,(plist-get (plist-get lsp :codeDescription) :href))
                (line . ,(ignore-errors (1- (line-number-at-pos (flymake-diagnostic-beg diagnostic)))))
                (text . ,(ignore-errors (buffer-substring-no-properties (flymake-diagnostic-beg diagnostic)
                                                                        (flymake-diagnostic-end diagnostic))))
                (beg . ,(flymake-diagnostic-beg diagnostic))
                (end . ,(flymake-diagnostic-end diagnostic)))))
          (flymake-diagnostics)))

(defun drive-find (code)
  (cl-find code (drive-diagnostics) :key (lambda (d) (alist-get 'code d)) :test #'equal))

(defun drive-run ()
  (setq notelsp-command (append (json-read-from-string (getenv "NOTELSP_CMD")) nil))
  (load (expand-file-name "notelsp.el" (getenv "NOTELSP_EDITORS")) nil t)
  (find-file (getenv "NOTELSP_NOTE"))
  (drive-put 'mode (symbol-name major-mode))
  ;; eglot-ensure connects after the command that opened the buffer: run what follows a command.
  (run-hooks 'post-command-hook)
  (drive-put 'managed (and (drive-wait (lambda () (bound-and-true-p eglot--managed-mode)) 30) t))
  ;; A first publication may be partial (review-continues marks where it stopped): wait for the whole.
  (drive-put 'diagnostics (drive-wait (lambda () (and (drive-find "wrong-shape") (not (drive-find "review-continues"))
                                                      (drive-diagnostics)))
                                      30))

  ;; Hover, asked the way eglot asks it (its own request and position conversion).
  (goto-char (point-min))
  (search-forward "{ClF3")
  (backward-char 2)
  (let ((hover (jsonrpc-request (eglot--current-server-or-lose) :textDocument/hover
                                (eglot--TextDocumentPositionParams))))
    (drive-put 'hover (plist-get (plist-get hover :contents) :value)))

  ;; The quick fix, through eglot's own command (one quickfix here, so it is applied without asking).
  (let ((shape (drive-find "wrong-shape")))
    (when shape
      (eglot-code-actions (alist-get 'beg shape) (alist-get 'end shape) "quickfix" t)
      (drive-put 'after_fix (buffer-substring-no-properties (point-min) (point-max)))
      (drive-put 'fix_cleared (and (drive-wait (lambda () (not (drive-find "wrong-shape"))) 30) t))))

  ;; Settings: the user's eglot-workspace-configuration switches a rule off.
  (drive-put 'before_settings (and (drive-wait (lambda () (drive-find "wrong-hybridization")) 30) t))
  (setq-default eglot-workspace-configuration '(:notelsp (:disabled ["wrong-hybridization"])))
  (eglot-signal-didChangeConfiguration (eglot--current-server-or-lose))
  (drive-put 'settings_cleared (and (drive-wait (lambda () (not (drive-find "wrong-hybridization"))) 30) t))
  (drive-put 'final (drive-diagnostics)))

(condition-case problem
    (drive-run)
  (error (drive-put 'error (format "%S" problem))))
(drive-finish)
;;; drive.el ends here
