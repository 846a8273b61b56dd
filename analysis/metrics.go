package analysis

// StepMetrics is one step as every output states it (CLI JSON and CSV, report, window).
// Values that do not exist are null: no torsional margin without engagement, no diameter at
// the point of greatest curvature when the file does not reach it, no fracture point when no
// material point reaches a damage of 1.
type StepMetrics struct {
	Step          int     `json:"step"` // from 1
	Label         string  `json:"label"`
	Alloy         string  `json:"alloy"`
	TipDepthMM    float64 `json:"tip_depth_mm"`
	TipFromApexMM float64 `json:"tip_from_apex_mm"`

	// ContactThresholdMM is the depth of cut below which a cell counts as untouched: the engaged
	// figures below count cells cut deeper than it (stated beside them in every output).
	ContactThresholdMM float64    `json:"contact_threshold_mm"`
	EngagedLengthMM    float64    `json:"engaged_length_mm"`
	EngagedFromTipMM   [2]float64 `json:"engaged_from_tip_mm"` // the engaged zone, mm from the tip
	EngagedAreaMM2     float64    `json:"engaged_area_mm2"`
	// ShankContactMM is the stretch past the cutting length where the shank touches the wall:
	// it loads the file but cuts nothing, so it is in none of the engaged figures.
	ShankContactMM   float64 `json:"shank_contact_mm"`
	RemovedVolumeMM3 float64 `json:"removed_volume_mm3"`
	MaxDepthOfCutMM  float64 `json:"max_depth_of_cut_mm"`
	UntouchedWallPct float64 `json:"untouched_wall_pct"`

	DiameterAtMaxCurvatureMM *float64 `json:"diameter_at_max_curvature_mm"`
	StrainAtMaxCurvaturePct  *float64 `json:"strain_at_max_curvature_pct"`
	PeakStrainPct            float64  `json:"peak_strain_pct"`
	PeakStrainFromTipMM      float64  `json:"peak_strain_from_tip_mm"`

	FatigueDamage       float64  `json:"fatigue_damage"` // Miner's sum at the most used point; 1 = fracture
	PeakDamageFromTipMM float64  `json:"peak_damage_from_tip_mm"`
	FractureFromTipMM   *float64 `json:"fracture_from_tip_mm"`
	FractureTimeS       *float64 `json:"fracture_time_s"`
	FractureTipDepthMM  *float64 `json:"fracture_tip_depth_mm"`
	ScheduleTimeS       float64  `json:"schedule_time_s"`
	Revolutions         float64  `json:"revolutions"`

	TorsionMargin          *float64 `json:"torsion_margin"` // capacity over load at the weakest section
	TorsionMarginFromTipMM *float64 `json:"torsion_margin_from_tip_mm"`
	PeakTorqueIndex        float64  `json:"peak_torque_index"` // N*cm at the illustrative cutting coefficient
	CapacityAt3mmNcm       float64  `json:"capacity_at_3mm_ncm"`
	TorqueLimitNcm         *float64 `json:"torque_limit_ncm"`

	// How this step moved the canal against the canal as it met it (Gambill et al. 1996).
	Transport

	// The wall left to the root's outer surface after the step (absent without a root).
	Wall

	Advice []Advice `json:"advice"`
}

// Advice is common practice shown as advice, never as a verdict.
type Advice struct {
	Code string `json:"code"`
	Text string `json:"text"`
}

// ResultSummary is the whole run as `analyze --format json` prints it.
type ResultSummary struct {
	Canal CanalSummary  `json:"canal"`
	Model ModelSummary  `json:"model"`
	Steps []StepMetrics `json:"steps"`
	// Sequence: how the whole sequence moved the canal against the canal as scanned.
	Sequence Transport `json:"sequence"`
	// WallAsScanned is the wall to the root's outer surface before any step (absent without a root).
	WallAsScanned *Wall    `json:"wall_as_scanned,omitempty"`
	Warnings      []string `json:"warnings"`
	Caution       string   `json:"caution"`
}

// ModelSummary states the settings behind the figures.
type ModelSummary struct {
	PathModel                 string  `json:"path_model"`
	ContactThresholdMM        float64 `json:"contact_threshold_mm"`
	CuttingCoefficientNPerMM2 float64 `json:"cutting_coefficient_n_per_mm2"`
	WallStiffnessNPerMM2      float64 `json:"wall_stiffness_n_per_mm2"`
	// MinWallMM is the wall the thin-wall warning asks to keep (absent without a root).
	MinWallMM *float64 `json:"min_wall_mm,omitempty"`
	// RootSource says where the root's outer surface comes from (absent without one).
	RootSource string `json:"root_source,omitempty"`
	Note       string `json:"note"`
}

// Caution is the safety wording every report and the About box carry.
const Caution = "The figures are model estimates from a surface scan and stated material parameters, " +
	"not a guarantee against file separation, ledging or perforation; clinical decisions follow the " +
	"clinician's judgement, the maker's directions for use and local regulations and licensed practice."

// Summary states the run.
func (r *Result) Summary() ResultSummary {
	out := ResultSummary{
		Canal: r.Canal.Summary(false),
		Model: ModelSummary{
			PathModel:                 r.Options.PathModel,
			WallStiffnessNPerMM2:      r.Options.WallStiffness,
			ContactThresholdMM:        r.Options.ContactThreshold,
			CuttingCoefficientNPerMM2: r.Options.CuttingCoefficient,
			MinWallMM:                 r.wallLimit(),
			RootSource:                r.rootSource(),
			Note: "built-in alloy parameters, the cutting coefficient and the wall stiffness are illustrative; " +
				"torque, fatigue and transportation figures compare steps, they are not measurements",
		},
		Warnings: append([]string{}, r.Warnings...),
		Caution:  Caution,
		Sequence: r.Moved,
	}
	if r.ScannedWall.ThinnestWallMM != nil {
		w := r.ScannedWall
		out.WallAsScanned = &w
	}
	for _, s := range r.Steps {
		out.Steps = append(out.Steps, s.Metrics)
	}
	return out
}

// wallLimit is the thin-wall limit when a root is known, else nil.
func (r *Result) wallLimit() *float64 {
	if r.Canal.Root == nil {
		return nil
	}
	return finite(r.Options.MinWallMM)
}

func (r *Result) rootSource() string {
	if r.Canal.Root == nil {
		return ""
	}
	return r.Canal.Root.Source
}
