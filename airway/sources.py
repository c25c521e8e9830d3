"""The registry of sources behind every clinical number in ``airway``.

Each weight, threshold, band and dose in the package carries an
:class:`Evidence` record: a source id from :data:`SOURCES` and a *basis* that
says how firmly the number stands:

``published``
    the number was read in the cited source (at least its abstract);
``from_memory``
    the number is widely quoted from the cited source but was not re-read
    there when it was entered: check it against the paper before relying on it;
``common_practice``
    usual practice with no single published source;
``project_rule``
    a choice made by this project where no published figure exists (for
    example, how many points an oedema sign adds); it is shown as such.

A test fails if any constant names a source id that is not registered here.
"""

from typing import Literal, NamedTuple

Basis = Literal["published", "from_memory", "common_practice", "project_rule"]

BASIS_LABEL: dict[str, str] = {
    "published": "published",
    "from_memory": "figure not yet checked against the paper",
    "common_practice": "common practice, no single source",
    "project_rule": "project rule, no published figure",
}


# For tables and one-line factor rows.
SHORT_BASIS_LABEL: dict[str, str] = {
    "published": "published",
    "from_memory": "not checked against the paper",
    "common_practice": "common practice",
    "project_rule": "project rule",
}


class Source(NamedTuple):
    """A citable source."""

    id: str
    short: str
    citation: str


class Evidence(NamedTuple):
    """Where a number comes from and how firmly it stands."""

    source: str
    basis: Basis
    note: str = ""

    def describe(self) -> str:
        """One line for a clinician: short citation and basis."""
        text = _DESCRIBED.get(self)
        if text is None:  # the registry never changes: each line is worked out once
            text = source_label(self.source, self.basis)
            text = _DESCRIBED[self] = f"{text}; {self.note}" if self.note else text
        return text


_DESCRIBED: dict[Evidence, str] = {}


# Pseudo-sources whose name already says what the basis says.
_SELF_DESCRIBING = ("project", "common_practice")


def source_label(source: str, basis: str, short: bool = False) -> str:
    """'Rocke 1992 [published]', or just the basis for a rule or common practice."""
    label = (BASIS_LABEL if not short else SHORT_BASIS_LABEL)[basis]
    if source in _SELF_DESCRIBING:
        return label
    return f"{SOURCES[source].short} [{label}]"


_ALL = [
    Source(
        "rocke1992",
        "Rocke 1992",
        "Rocke DA, Murray WB, Rout CC, Gouws E. Relative risk analysis of factors "
        "associated with difficult intubation in obstetric anesthesia. "
        "Anesthesiology 1992;77(1):67-73.",
    ),
    Source(
        "quinn2013",
        "Quinn 2013",
        "Quinn AC et al. Failed tracheal intubation in obstetric anaesthesia: 2 yr "
        "national case-control study in the UK. Br J Anaesth 2013;110(1):74-80.",
    ),
    Source(
        "mckeen2011",
        "McKeen 2011",
        "McKeen DM et al. Difficult and failed intubation: incident rates and "
        "maternal, obstetrical, and anesthetic predictors. Can J Anesth 2011;58:514-24.",
    ),
    Source(
        "detsky2019",
        "Detsky 2019",
        "Detsky ME et al. Will this patient be difficult to intubate? The Rational "
        "Clinical Examination systematic review. JAMA 2019;321(5):493-503.",
    ),
    Source(
        "khan2003",
        "Khan 2003",
        "Khan ZH, Kashfi A, Ebrahimkhani E. A comparison of the upper lip bite test "
        "with modified Mallampati classification. Anesth Analg 2003;96:595-9.",
    ),
    Source(
        "samsoon1987",
        "Samsoon & Young 1987",
        "Samsoon GL, Young JR. Difficult tracheal intubation: a retrospective study. "
        "Anaesthesia 1987;42:487-90.",
    ),
    Source(
        "kodali2008",
        "Kodali 2008",
        "Kodali BS et al. Airway changes during labor and delivery. "
        "Anesthesiology 2008;108:357-62.",
    ),
    Source(
        "boutonnet2010",
        "Boutonnet 2010",
        "Boutonnet M et al. Mallampati class changes during pregnancy, labour, and "
        "after delivery: can these be predicted? Br J Anaesth 2010;104:67-70.",
    ),
    Source(
        "izci2003",
        "Izci 2003",
        "Izci B et al. Upper airway size in pregnancy and pre-eclampsia. "
        "Am J Respir Crit Care Med 2003;167(2):137-40.",
    ),
    Source(
        "capetown_registry",
        "Burger (Cape Town registry)",
        "Burger A, Smit MI, van Dyk D, Reed AR, Dyer RA, Hofmeyr R. Hypoxaemia during "
        "obstetric airway management: Cape Town obstetric airway registry. "
        "South Afr J Anaesth Analg (year not verified).",
    ),
    Source(
        "hirmanpour2014",
        "Hirmanpour 2014",
        "Hirmanpour A et al. Evaluation of airway tests in parturients undergoing "
        "caesarean section under general anaesthesia. Adv Biomed Res 2014;3:200 "
        "(title paraphrased).",
    ),
    Source(
        "khan2014",
        "Khan 2014",
        "Khan FA. Airway management in the obstetric patient (review). "
        "Anaesth Pain Intensive Care 2014;18:387-404.",
    ),
    Source(
        "datta1981",
        "Datta & Briwa 1981",
        "Datta S, Briwa J. Modified laryngoscope for endotracheal intubation of "
        "obese patients. Anesth Analg 1981;60:120-1.",
    ),
    Source(
        "mushambi2015",
        "OAA/DAS 2015 (Mushambi)",
        "Mushambi MC, Kinsella SM, Popat M, Swales H, Ramaswamy KK, Winton AL, Quinn AC. "
        "Obstetric Anaesthetists' Association and Difficult Airway Society guidelines "
        "for the management of difficult and failed tracheal intubation in obstetrics. "
        "Anaesthesia 2015;70:1286-306.",
    ),
    Source(
        "frerk2015",
        "DAS 2015 (Frerk)",
        "Frerk C et al. Difficult Airway Society 2015 guidelines for management of "
        "unanticipated difficult intubation in adults. Br J Anaesth 2015;115(6):827-48.",
    ),
    Source(
        "vanner1999",
        "Vanner & Asai 1999",
        "Vanner RG, Asai T. Safe use of cricoid pressure. Anaesthesia 1999;54:1-3.",
    ),
    Source(
        "kinsella2015",
        "Kinsella 2015",
        "Kinsella SM et al. Failed tracheal intubation during obstetric general "
        "anaesthesia: a literature review. Int J Obstet Anesth 2015;24:356-74.",
    ),
    Source(
        "lucas2000",
        "Lucas 2000",
        "Lucas DN et al. Urgency of caesarean section: a new classification. "
        "J R Soc Med 2000;93:346-50.",
    ),
    Source(
        "who_bmi",
        "WHO 2000",
        "World Health Organization. Obesity: preventing and managing the global "
        "epidemic. WHO Technical Report Series 894. Geneva: WHO, 2000.",
    ),
    Source(
        "devine1974",
        "Devine 1974",
        "Devine BJ. Gentamicin therapy. Drug Intell Clin Pharm 1974;8:650-5.",
    ),
    Source(
        "janmahasatian2005",
        "Janmahasatian 2005",
        "Janmahasatian S, Duffull SB, Ash S, Ward LC, Byrne NM, Green B. "
        "Quantification of lean bodyweight. Clin Pharmacokinet 2005;44(10):1051-65.",
    ),
    Source(
        "erstad2004",
        "Erstad 2004",
        "Erstad BL. Dosing of medications in morbidly obese patients in the intensive "
        "care unit setting. Intensive Care Med 2004;30:18-32 (adjusted weight, factor 0.4).",
    ),
    Source(
        "nightingale2015",
        "AAGBI/SOBA 2015 (Nightingale)",
        "Nightingale CE et al. Peri-operative management of the obese surgical "
        "patient 2015. Anaesthesia 2015;70:859-76 (Table 3, dosing scalars).",
    ),
    Source(
        "subramani2017",
        "Subramani 2017",
        "Subramani Y, Riad W, Chung F, Wong J. Optimal propofol induction dose in "
        "morbidly obese patients: a randomized controlled trial comparing the bispectral "
        "index and lean body weight scalar. Can J Anesth 2017 (after 2.6 mg/kg lean "
        "weight, 18 of 30 needed more propofol).",
    ),
    Source(
        "valtonen1989",
        "Valtonen 1989",
        "Valtonen M et al. Comparison of propofol and thiopentone for induction of "
        "anaesthesia for elective caesarean section. Anaesthesia 1989;44:758-62 "
        "(author and pages from memory).",
    ),
    Source(
        "lemmens2006",
        "Lemmens & Brodsky 2006",
        "Lemmens HJ, Brodsky JB. The dose of succinylcholine in morbid obesity. "
        "Anesth Analg 2006;102:438-42.",
    ),
    Source(
        "elorbany2010",
        "El-Orbany & Connolly 2010",
        "El-Orbany M, Connolly LA. Rapid sequence induction and intubation: current "
        "controversy. Anesth Analg 2010;110:1318-25.",
    ),
    Source(
        "leykin2004",
        "Leykin 2004",
        "Leykin Y et al. The pharmacodynamic effects of rocuronium when dosed "
        "according to real body weight or ideal body weight in morbidly obese "
        "patients. Anesth Analg 2004;99:1086-9.",
    ),
    Source(
        "williamson2011",
        "Williamson 2011",
        "Williamson RM, Mallaiah S, Barclay P. Rocuronium and sugammadex for rapid "
        "sequence induction of obstetric general anaesthesia. "
        "Acta Anaesthesiol Scand 2011;55:694-9.",
    ),
    Source(
        "sugammadex_label",
        "Sugammadex label",
        "Sugammadex prescribing information (US label and EU summary of product "
        "characteristics): 16 mg/kg actual body weight for immediate reversal after "
        "rocuronium 1.2 mg/kg.",
    ),
    Source(
        "karmali2020",
        "Karmali & Rose 2020",
        "Karmali S, Rose P. Tracheal tube size in adults undergoing elective surgery: "
        "a narrative review. Anaesthesia 2020;75:1529-39.",
    ),
    Source(
        "mgh_handbook",
        "MGH Clinical Anesthesia Procedures",
        "Clinical Anesthesia Procedures of the Massachusetts General Hospital, "
        "chapter on obstetric anaesthesia (6.0-6.5 mm tubes traditionally advised).",
    ),
    Source(
        "avidan2015",
        "Avidan 2015",
        "Avidan et al. Eur J Anaesthesiol 2015;32:432 (manufacturers' weight-based "
        "supraglottic sizing has no scientific basis; 20,893 cases).",
    ),
    Source(
        "bauer2021",
        "SOAP 2021 (Bauer)",
        "Bauer ME et al. The Society for Obstetric Anesthesia and Perinatology "
        "interdisciplinary consensus statement on neuraxial procedures in obstetric "
        "patients with thrombocytopenia. Anesth Analg 2021;132:1531-44.",
    ),
    Source(
        "tanoubi2009",
        "Tanoubi 2009",
        "Tanoubi I, Drolet P, Donati F. Optimizing preoxygenation in adults. "
        "Can J Anesth 2009;56:449-66.",
    ),
    Source(
        "handbook_bedside",
        "Anesthesiology handbook table",
        "Airway assessment chapter of a general anesthesiology handbook: neck "
        "circumference is the strongest predictor of impossible mask ventilation.",
    ),
    Source(
        "farmery1996",
        "Farmery & Roe 1996",
        "Farmery AD, Roe PG. A model to describe the rate of oxyhaemoglobin "
        "desaturation during apnoea. Br J Anaesth 1996;76:284-91 (pages from memory).",
    ),
    Source(
        "severinghaus1979",
        "Severinghaus 1979",
        "Severinghaus JW. Simple, accurate equations for human blood O2 dissociation "
        "computations. J Appl Physiol 1979;46:599-602.",
    ),
    Source(
        "mcclelland2008",
        "McClelland 2008",
        "McClelland SH, Bogod DG, Hardman JG. Apnoea in pregnancy: an investigation "
        "using physiological modelling. Anaesthesia 2008;63:264-9.",
    ),
    Source(
        "mcclelland2009",
        "McClelland 2009",
        "McClelland SH, Bogod DG, Hardman JG. Pre-oxygenation and apnoea in pregnancy: "
        "changes during labour and with obstetric morbidity in a computational "
        "simulation. Anaesthesia 2009;64:371-7.",
    ),
    Source(
        "eliasson1992",
        "Eliasson 1992",
        "Eliasson AH et al. Oxygen consumption and ventilation during normal labor. "
        "Chest 1992;102:467-71.",
    ),
    Source(
        "nunn",
        "Nunn's Applied Respiratory Physiology",
        "Lumb AB. Nunn's Applied Respiratory Physiology (oxygen stores and consumption chapters).",
    ),
    Source(
        "pillai2016",
        "Pillai 2016",
        "Pillai A, Chikhani M, Hardman JG. Apnoeic oxygenation in pregnancy: a "
        "modelling investigation. Anaesthesia 2016;71:1077-80.",
    ),
    Source(
        "wise2006",
        "Wise 2006",
        "Wise RA, Polito AJ, Krishnan V. Respiratory physiologic changes in pregnancy. "
        "Immunol Allergy Clin North Am 2006;26:1-12.",
    ),
    Source(
        "quanjer1993",
        "ERS 1993 (Quanjer)",
        "Quanjer PH et al. Lung volumes and forced ventilatory flows. Eur Respir J "
        "1993;6 Suppl 16:5-40 (predicted FRC for women).",
    ),
    Source(
        "jones2006",
        "Jones & Nzekwu 2006",
        "Jones RL, Nzekwu MM. The effects of body mass index on lung volumes. "
        "Chest 2006;130:827-33.",
    ),
    Source(
        "brody1945",
        "Brody 1945",
        "Brody S. Bioenergetics and Growth. New York: Reinhold, 1945 (oxygen consumption "
        "scaling with body mass to the power 0.75).",
    ),
    Source(
        "sirian2009",
        "Sirian & Wills 2009",
        "Sirian R, Wills J. Physiology of apnoea and the benefits of preoxygenation. "
        "Contin Educ Anaesth Crit Care Pain 2009;9:105-8.",
    ),
    Source(
        "nadler1962",
        "Nadler 1962",
        "Nadler SB, Hidalgo JU, Bloch T. Prediction of blood volume in normal human adults. "
        "Surgery 1962;51:224-32.",
    ),
    Source(
        "icsm2021",
        "ICSM simulator 2021",
        "High-flow nasal oxygen in obese and pregnant patients: a computational modelling "
        "study. Br J Anaesth 2021 (PMID 33549319; authors not listed here).",
    ),
    Source(
        "common_practice",
        "Common practice",
        "Usual practice in obstetric anaesthesia; no single published source.",
    ),
    Source(
        "project",
        "airway project rule",
        "A choice made by the airway project where no published figure exists; "
        "documented in DEVELOPERS.md.",
    ),
]

SOURCES: dict[str, Source] = {s.id: s for s in _ALL}
