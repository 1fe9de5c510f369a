package recipe

// planTFMap is written by the tf-map work in progress.
func (p *Plan) planTFMap(path string, a *Analysis) (finisher, error) {
	return nil, ferr(path+".type", "%q analyses are not available in this build", a.Type)
}
