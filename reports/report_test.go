package reports_test

import (
	"testing"
)

func TestRender_Look(t *testing.T) {
	for _, name := range []string{"osprey-ready", "kestrel-drooping-wing", "osprey-new-intake"} {
		pdf := render(t, caseInput(t, name), testOptions(""))
		keepPDF(t, name, pdf)
	}
}
