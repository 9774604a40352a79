;;; notelsp.el --- notelsp through eglot  -*- lexical-binding: t; -*-

;; Load from your init file, e.g. (load "/path/to/notelsp/editors/emacs/notelsp.el"),
;; or copy the forms.  Works with Emacs 28 and eglot 1.9 from ELPA (Debian 12:
;; apt-get install emacs-nox elpa-eglot) and with Emacs 29+, where eglot is built in.

(require 'eglot)

(defvar notelsp-command '("notelsp" "serve")
  "How to start the notelsp server over stdio; set it before loading this file.")

(defvar notelsp-note-file-regexp "\\.\\(?:md\\|markdown\\|qmd\\|[Rr]md\\|mdx\\|txt\\)\\'"
  "Files whose buffers get notelsp (the note types the server reviews).")

;; Without markdown-mode (ELPA/Debian package elpa-markdown-mode), Emacs opens .md files in
;; fundamental-mode, where no server starts: read them as text instead.
(unless (fboundp 'markdown-mode)
  (add-to-list 'auto-mode-alist '("\\.\\(?:md\\|markdown\\)\\'" . text-mode)))

(add-to-list 'eglot-server-programs
             `((markdown-mode gfm-mode text-mode) . ,notelsp-command))

;; Answered to the server's workspace/configuration request (and sent with
;; workspace/didChangeConfiguration): the keys of the [review] table of
;; .notelsp.toml, over that file.  Lists are vectors, false is :json-false, e.g.
;;   (:notelsp (:disabled ["outside-model"] :inlay_hints :json-false))
;; Per project, set it in .dir-locals.el instead.  After changing it in a
;; running session: M-x eglot-signal-didChangeConfiguration.
(setq-default eglot-workspace-configuration
              '(:notelsp (:inlay_hints t)))

(defun notelsp-ensure ()
  "Start (or join) the notelsp session for a note's buffer; other text buffers are left alone."
  (when (and buffer-file-name (string-match-p notelsp-note-file-regexp buffer-file-name))
    (eglot-ensure)))

;; markdown-mode and gfm-mode derive from text-mode, so this hook covers them.
(add-hook 'text-mode-hook #'notelsp-ensure)

(provide 'notelsp)
;;; notelsp.el ends here
