;;; notelsp.el --- notelsp through eglot  -*- lexical-binding: t; -*-

;; Load from your init file, e.g. (load "/path/to/notelsp/editors/emacs/notelsp.el"),
;; or copy the forms.  Needs Emacs 29+ (eglot built in) or eglot from ELPA.

(require 'eglot)

(defvar notelsp-command '("notelsp" "serve")
  "How to start the notelsp server over stdio.")

(add-to-list 'eglot-server-programs
             `((markdown-mode gfm-mode text-mode) . ,notelsp-command))

;; Sent as the "notelsp" section of workspace/configuration; the same keys as
;; the [review] table of .notelsp.toml.  Leave empty to use that file.
(setq-default eglot-workspace-configuration
              '(:notelsp (:inlay_hints t)))

;; Start the server for notes automatically.
(add-hook 'markdown-mode-hook #'eglot-ensure)
(add-hook 'text-mode-hook #'eglot-ensure)

(provide 'notelsp)
;;; notelsp.el ends here
