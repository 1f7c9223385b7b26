package views

import "github.com/a-h/templ"

type templComponent = templ.Component
