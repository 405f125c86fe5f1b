package report

import (
	"fmt"
	"slices"
	"strconv"
	"strings"

	"pcqc/analysis"
	"pcqc/analysis/intake"
)

// Reference is one cited work, with its BibTeX entry for references.bib.
type Reference struct {
	Key      string
	Citation string // formatted for the reference list
	BibTeX   string
}

// bibliography holds every work the report may cite, keyed for reuse.
var bibliography = map[string]Reference{
	"josse2012": {Citation: "Josse, J. & Husson, F. (2012). Handling missing values in exploratory multivariate data analysis methods. Journal de la Société Française de Statistique 153: 79–99.",
		BibTeX: `@article{josse2012, author = {Josse, Julie and Husson, Fran{\c{c}}ois}, title = {Handling missing values in exploratory multivariate data analysis methods}, journal = {Journal de la Soci{\'e}t{\'e} Fran{\c{c}}aise de Statistique}, volume = {153}, number = {2}, pages = {79--99}, year = {2012}}`},
	"bijlsma2006": {Citation: "Bijlsma, S., Bobeldijk, I., Verheij, E. R., Ramaker, R., Kochhar, S., Macdonald, I. A., van Ommen, B. & Smilde, A. K. (2006). Large-scale human metabolomics studies: a strategy for data (pre-) processing and validation. Analytical Chemistry 78: 567–574.",
		BibTeX: `@article{bijlsma2006, author = {Bijlsma, Sabina and Bobeldijk, Ivana and Verheij, Elwin R. and Ramaker, Raymond and Kochhar, Sunil and Macdonald, Ian A. and van Ommen, Ben and Smilde, Age K.}, title = {Large-scale human metabolomics studies: a strategy for data (pre-) processing and validation}, journal = {Analytical Chemistry}, volume = {78}, number = {2}, pages = {567--574}, year = {2006}}`},
	"jolliffe2016": {Citation: "Jolliffe, I. T. & Cadima, J. (2016). Principal component analysis: a review and recent developments. Philosophical Transactions of the Royal Society A 374: 20150202.",
		BibTeX: `@article{jolliffe2016, author = {Jolliffe, Ian T. and Cadima, Jorge}, title = {Principal component analysis: a review and recent developments}, journal = {Philosophical Transactions of the Royal Society A}, volume = {374}, number = {2065}, pages = {20150202}, year = {2016}}`},
	"vandenberg2006": {Citation: "van den Berg, R. A., Hoefsloot, H. C. J., Westerhuis, J. A., Smilde, A. K. & van der Werf, M. J. (2006). Centering, scaling, and transformations: improving the biological information content of metabolomics data. BMC Genomics 7: 142.",
		BibTeX: `@article{vandenberg2006, author = {van den Berg, Robert A. and Hoefsloot, Huub C. J. and Westerhuis, Johan A. and Smilde, Age K. and van der Werf, Mari{\"e}t J.}, title = {Centering, scaling, and transformations: improving the biological information content of metabolomics data}, journal = {BMC Genomics}, volume = {7}, pages = {142}, year = {2006}}`},
	"demmel2012": {Citation: "Demmel, J., Grigori, L., Hoemmen, M. & Langou, J. (2012). Communication-optimal parallel and sequential QR and LU factorizations. SIAM Journal on Scientific Computing 34: A206–A239.",
		BibTeX: `@article{demmel2012, author = {Demmel, James and Grigori, Laura and Hoemmen, Mark and Langou, Julien}, title = {Communication-optimal parallel and sequential {QR} and {LU} factorizations}, journal = {SIAM Journal on Scientific Computing}, volume = {34}, number = {1}, pages = {A206--A239}, year = {2012}}`},
	"hornung1990": {Citation: "Hornung, R. W. & Reed, L. D. (1990). Estimation of average concentration in the presence of nondetectable values. Applied Occupational and Environmental Hygiene 5: 46–51.",
		BibTeX: `@article{hornung1990, author = {Hornung, Richard W. and Reed, Laurence D.}, title = {Estimation of average concentration in the presence of nondetectable values}, journal = {Applied Occupational and Environmental Hygiene}, volume = {5}, number = {1}, pages = {46--51}, year = {1990}}`},
	"croghan2003": {Citation: "Croghan, C. W. & Egeghy, P. P. (2003). Methods of dealing with values below the limit of detection using SAS. Southern SAS User Group (SESUG), St. Petersburg, FL, 22–24 September 2003. US EPA, National Exposure Research Laboratory.",
		BibTeX: `@inproceedings{croghan2003, author = {Croghan, Carry W. and Egeghy, Peter P.}, title = {Methods of dealing with values below the limit of detection using {SAS}}, booktitle = {Southern SAS User Group (SESUG)}, address = {St. Petersburg, FL}, organization = {US EPA, National Exposure Research Laboratory}, year = {2003}}`},
	"horn1965": {Citation: "Horn, J. L. (1965). A rationale and test for the number of factors in factor analysis. Psychometrika 30: 179–185.",
		BibTeX: `@article{horn1965, author = {Horn, John L.}, title = {A rationale and test for the number of factors in factor analysis}, journal = {Psychometrika}, volume = {30}, number = {2}, pages = {179--185}, year = {1965}}`},
	"bro2008": {Citation: "Bro, R., Kjeldahl, K., Smilde, A. K. & Kiers, H. A. L. (2008). Cross-validation of component models: a critical look at current methods. Analytical and Bioanalytical Chemistry 390: 1241–1251.",
		BibTeX: `@article{bro2008, author = {Bro, Rasmus and Kjeldahl, Karin and Smilde, Age K. and Kiers, Henk A. L.}, title = {Cross-validation of component models: a critical look at current methods}, journal = {Analytical and Bioanalytical Chemistry}, volume = {390}, number = {5}, pages = {1241--1251}, year = {2008}}`},
	"clopper1934": {Citation: "Clopper, C. J. & Pearson, E. S. (1934). The use of confidence or fiducial limits illustrated in the case of the binomial. Biometrika 26: 404–413.",
		BibTeX: `@article{clopper1934, author = {Clopper, C. J. and Pearson, E. S.}, title = {The use of confidence or fiducial limits illustrated in the case of the binomial}, journal = {Biometrika}, volume = {26}, number = {4}, pages = {404--413}, year = {1934}}`},
	"glorfeld1995": {Citation: "Glorfeld, L. W. (1995). An improvement on Horn's parallel analysis methodology for selecting the correct number of factors to retain. Educational and Psychological Measurement 55: 377–393.",
		BibTeX: `@article{glorfeld1995, author = {Glorfeld, Louis W.}, title = {An improvement on {Horn's} parallel analysis methodology for selecting the correct number of factors to retain}, journal = {Educational and Psychological Measurement}, volume = {55}, number = {3}, pages = {377--393}, year = {1995}}`},
	"frontier1976": {Citation: "Frontier, S. (1976). Étude de la décroissance des valeurs propres dans une analyse en composantes principales: comparaison avec le modèle du bâton brisé. Journal of Experimental Marine Biology and Ecology 25: 67–75.",
		BibTeX: `@article{frontier1976, author = {Frontier, Serge}, title = {{\'E}tude de la d{\'e}croissance des valeurs propres dans une analyse en composantes principales: comparaison avec le mod{\` + "`" + `e}le du b{\^a}ton bris{\'e}}, journal = {Journal of Experimental Marine Biology and Ecology}, volume = {25}, number = {1}, pages = {67--75}, year = {1976}}`},
	"jackson1993": {Citation: "Jackson, D. A. (1993). Stopping rules in principal components analysis: a comparison of heuristical and statistical approaches. Ecology 74: 2204–2214.",
		BibTeX: `@article{jackson1993, author = {Jackson, Donald A.}, title = {Stopping rules in principal components analysis: a comparison of heuristical and statistical approaches}, journal = {Ecology}, volume = {74}, number = {8}, pages = {2204--2214}, year = {1993}}`},
	"kaiser1960": {Citation: "Kaiser, H. F. (1960). The application of electronic computers to factor analysis. Educational and Psychological Measurement 20: 141–151.",
		BibTeX: `@article{kaiser1960, author = {Kaiser, Henry F.}, title = {The application of electronic computers to factor analysis}, journal = {Educational and Psychological Measurement}, volume = {20}, number = {1}, pages = {141--151}, year = {1960}}`},
	"chan1983": {Citation: "Chan, T. F., Golub, G. H. & LeVeque, R. J. (1983). Algorithms for computing the sample variance: analysis and recommendations. The American Statistician 37: 242–247.",
		BibTeX: `@article{chan1983, author = {Chan, Tony F. and Golub, Gene H. and LeVeque, Randall J.}, title = {Algorithms for computing the sample variance: analysis and recommendations}, journal = {The American Statistician}, volume = {37}, number = {3}, pages = {242--247}, year = {1983}}`},
	"vitter1985": {Citation: "Vitter, J. S. (1985). Random sampling with a reservoir. ACM Transactions on Mathematical Software 11: 37–57.",
		BibTeX: `@article{vitter1985, author = {Vitter, Jeffrey S.}, title = {Random sampling with a reservoir}, journal = {ACM Transactions on Mathematical Software}, volume = {11}, number = {1}, pages = {37--57}, year = {1985}}`},
	"hanley2006": {Citation: "Hanley, J. A. & MacGibbon, B. (2006). Creating non-parametric bootstrap samples using Poisson frequencies. Computer Methods and Programs in Biomedicine 83: 57–62.",
		BibTeX: `@article{hanley2006, author = {Hanley, James A. and MacGibbon, Brenda}, title = {Creating non-parametric bootstrap samples using {Poisson} frequencies}, journal = {Computer Methods and Programs in Biomedicine}, volume = {83}, number = {1}, pages = {57--62}, year = {2006}}`},
	"hotelling1931": {Citation: "Hotelling, H. (1931). The generalization of Student's ratio. Annals of Mathematical Statistics 2: 360–378.",
		BibTeX: `@article{hotelling1931, author = {Hotelling, Harold}, title = {The generalization of {Student's} ratio}, journal = {Annals of Mathematical Statistics}, volume = {2}, number = {3}, pages = {360--378}, year = {1931}}`},
	"tracy1992": {Citation: "Tracy, N. D., Young, J. C. & Mason, R. L. (1992). Multivariate control charts for individual observations. Journal of Quality Technology 24: 88–95.",
		BibTeX: `@article{tracy1992, author = {Tracy, Nola D. and Young, John C. and Mason, Robert L.}, title = {Multivariate control charts for individual observations}, journal = {Journal of Quality Technology}, volume = {24}, number = {2}, pages = {88--95}, year = {1992}}`},
	"jackson1979": {Citation: "Jackson, J. E. & Mudholkar, G. S. (1979). Control procedures for residuals associated with principal component analysis. Technometrics 21: 341–349.",
		BibTeX: `@article{jackson1979, author = {Jackson, J. Edward and Mudholkar, Govind S.}, title = {Control procedures for residuals associated with principal component analysis}, journal = {Technometrics}, volume = {21}, number = {3}, pages = {341--349}, year = {1979}}`},
	"box1954": {Citation: "Box, G. E. P. (1954). Some theorems on quadratic forms applied in the study of analysis of variance problems, I. Annals of Mathematical Statistics 25: 290–302.",
		BibTeX: `@article{box1954, author = {Box, George E. P.}, title = {Some theorems on quadratic forms applied in the study of analysis of variance problems, {I}. {E}ffect of inequality of variance in the one-way classification}, journal = {Annals of Mathematical Statistics}, volume = {25}, number = {2}, pages = {290--302}, year = {1954}}`},
	"sidak1967": {Citation: "Šidák, Z. (1967). Rectangular confidence regions for the means of multivariate normal distributions. Journal of the American Statistical Association 62: 626–633.",
		BibTeX: `@article{sidak1967, author = {{\v{S}}id{\'a}k, Zbyn{\v{e}}k}, title = {Rectangular confidence regions for the means of multivariate normal distributions}, journal = {Journal of the American Statistical Association}, volume = {62}, number = {318}, pages = {626--633}, year = {1967}}`},
	"sullivan1996": {Citation: "Sullivan, J. H. & Woodall, W. H. (1996). A comparison of multivariate control charts for individual observations. Journal of Quality Technology 28: 398–408.",
		BibTeX: `@article{sullivan1996, author = {Sullivan, Joe H. and Woodall, William H.}, title = {A comparison of multivariate control charts for individual observations}, journal = {Journal of Quality Technology}, volume = {28}, number = {4}, pages = {398--408}, year = {1996}}`},
	"lange1989": {Citation: "Lange, K. L., Little, R. J. A. & Taylor, J. M. G. (1989). Robust statistical modeling using the t distribution. Journal of the American Statistical Association 84: 881–896.",
		BibTeX: `@article{lange1989, author = {Lange, Kenneth L. and Little, Roderick J. A. and Taylor, Jeremy M. G.}, title = {Robust statistical modeling using the t distribution}, journal = {Journal of the American Statistical Association}, volume = {84}, number = {408}, pages = {881--896}, year = {1989}}`},
	"embrechts1997": {Citation: "Embrechts, P., Klüppelberg, C. & Mikosch, T. (1997). Modelling Extremal Events for Insurance and Finance. Springer, Berlin.",
		BibTeX: `@book{embrechts1997, author = {Embrechts, Paul and Kl{\"u}ppelberg, Claudia and Mikosch, Thomas}, title = {Modelling Extremal Events for Insurance and Finance}, publisher = {Springer}, address = {Berlin}, year = {1997}}`},
	"kuhn1955": {Citation: "Kuhn, H. W. (1955). The Hungarian method for the assignment problem. Naval Research Logistics Quarterly 2: 83–97.",
		BibTeX: `@article{kuhn1955, author = {Kuhn, Harold W.}, title = {The {H}ungarian method for the assignment problem}, journal = {Naval Research Logistics Quarterly}, volume = {2}, number = {1--2}, pages = {83--97}, year = {1955}}`},
	"bjorck1973": {Citation: "Björck, Å. & Golub, G. H. (1973). Numerical methods for computing angles between linear subspaces. Mathematics of Computation 27: 579–594.",
		BibTeX: `@article{bjorck1973, author = {Bj{\"o}rck, {\AA}ke and Golub, Gene H.}, title = {Numerical methods for computing angles between linear subspaces}, journal = {Mathematics of Computation}, volume = {27}, number = {123}, pages = {579--594}, year = {1973}}`},
	"hoaglin1978": {Citation: "Hoaglin, D. C. & Welsch, R. E. (1978). The hat matrix in regression and ANOVA. The American Statistician 32: 17–22.",
		BibTeX: `@article{hoaglin1978, author = {Hoaglin, David C. and Welsch, Roy E.}, title = {The hat matrix in regression and {ANOVA}}, journal = {The American Statistician}, volume = {32}, number = {1}, pages = {17--22}, year = {1978}}`},
	"bartlett1950": {Citation: "Bartlett, M. S. (1950). Tests of significance in factor analysis. British Journal of Psychology, Statistical Section 3: 77–85.",
		BibTeX: `@article{bartlett1950, author = {Bartlett, Maurice S.}, title = {Tests of significance in factor analysis}, journal = {British Journal of Psychology, Statistical Section}, volume = {3}, pages = {77--85}, year = {1950}}`},
	"bartlett1951": {Citation: "Bartlett, M. S. (1951). The effect of standardization on a χ² approximation in factor analysis. Biometrika 38: 337–344.",
		BibTeX: `@article{bartlett1951, author = {Bartlett, Maurice S.}, title = {The effect of standardization on a $\chi^2$ approximation in factor analysis}, journal = {Biometrika}, volume = {38}, number = {3/4}, pages = {337--344}, year = {1951}}`},
	"kaiser1970": {Citation: "Kaiser, H. F. (1970). A second generation little jiffy. Psychometrika 35: 401–415.",
		BibTeX: `@article{kaiser1970, author = {Kaiser, Henry F.}, title = {A second generation little jiffy}, journal = {Psychometrika}, volume = {35}, number = {4}, pages = {401--415}, year = {1970}}`},
	"kaiser1974": {Citation: "Kaiser, H. F. (1974). An index of factorial simplicity. Psychometrika 39: 31–36.",
		BibTeX: `@article{kaiser1974, author = {Kaiser, Henry F.}, title = {An index of factorial simplicity}, journal = {Psychometrika}, volume = {39}, number = {1}, pages = {31--36}, year = {1974}}`},
	"west1995": {Citation: "West, S. G., Finch, J. F. & Curran, P. J. (1995). Structural equation models with nonnormal variables: problems and remedies. In R. H. Hoyle (ed.), Structural Equation Modeling: Concepts, Issues, and Applications, pp. 56–75. Sage.",
		BibTeX: `@incollection{west1995, author = {West, Stephen G. and Finch, John F. and Curran, Patrick J.}, title = {Structural equation models with nonnormal variables: problems and remedies}, booktitle = {Structural Equation Modeling: Concepts, Issues, and Applications}, editor = {Hoyle, Rick H.}, pages = {56--75}, publisher = {Sage}, year = {1995}}`},
	"joanes1998": {Citation: "Joanes, D. N. & Gill, C. A. (1998). Comparing measures of sample skewness and kurtosis. The Statistician 47: 183–189.",
		BibTeX: `@article{joanes1998, author = {Joanes, Derrick N. and Gill, Christine A.}, title = {Comparing measures of sample skewness and kurtosis}, journal = {Journal of the Royal Statistical Society: Series D (The Statistician)}, volume = {47}, number = {1}, pages = {183--189}, year = {1998}}`},
	"north1982": {Citation: "North, G. R., Bell, T. L., Cahalan, R. F. & Moeng, F. J. (1982). Sampling errors in the estimation of empirical orthogonal functions. Monthly Weather Review 110: 699–706.",
		BibTeX: `@article{north1982, author = {North, Gerald R. and Bell, Thomas L. and Cahalan, Robert F. and Moeng, Fanthune J.}, title = {Sampling errors in the estimation of empirical orthogonal functions}, journal = {Monthly Weather Review}, volume = {110}, number = {7}, pages = {699--706}, year = {1982}}`},
	"efron1979": {Citation: "Efron, B. (1979). Bootstrap methods: another look at the jackknife. Annals of Statistics 7: 1–26.",
		BibTeX: `@article{efron1979, author = {Efron, Bradley}, title = {Bootstrap methods: another look at the jackknife}, journal = {Annals of Statistics}, volume = {7}, number = {1}, pages = {1--26}, year = {1979}}`},
	"fisher2016": {Citation: "Fisher, A., Caffo, B., Schwartz, B. & Zipunnikov, V. (2016). Fast, exact bootstrap principal component analysis for p > 1 million. Journal of the American Statistical Association 111: 846–860.",
		BibTeX: `@article{fisher2016, author = {Fisher, Aaron and Caffo, Brian and Schwartz, Brian and Zipunnikov, Vadim}, title = {Fast, exact bootstrap principal component analysis for $p > 1$ million}, journal = {Journal of the American Statistical Association}, volume = {111}, number = {514}, pages = {846--860}, year = {2016}}`},
	"kleiner2014": {Citation: "Kleiner, A., Talwalkar, A., Sarkar, P. & Jordan, M. I. (2014). A scalable bootstrap for massive data. Journal of the Royal Statistical Society, Series B 76: 795–816.",
		BibTeX: `@article{kleiner2014, author = {Kleiner, Ariel and Talwalkar, Ameet and Sarkar, Purnamrita and Jordan, Michael I.}, title = {A scalable bootstrap for massive data}, journal = {Journal of the Royal Statistical Society, Series B}, volume = {76}, number = {4}, pages = {795--816}, year = {2014}}`},
	"tucker1951": {Citation: "Tucker, L. R. (1951). A Method for Synthesis of Factor Analysis Studies. Personnel Research Section Report 984, Department of the Army, Washington, DC.",
		BibTeX: `@techreport{tucker1951, author = {Tucker, Ledyard R.}, title = {A Method for Synthesis of Factor Analysis Studies}, institution = {Department of the Army, Personnel Research Section}, number = {984}, address = {Washington, DC}, year = {1951}}`},
	"lorenzoseva2006": {Citation: "Lorenzo-Seva, U. & ten Berge, J. M. F. (2006). Tucker's congruence coefficient as a meaningful index of factor similarity. Methodology 2: 57–64.",
		BibTeX: `@article{lorenzoseva2006, author = {Lorenzo-Seva, Urbano and ten Berge, Jos M. F.}, title = {Tucker's congruence coefficient as a meaningful index of factor similarity}, journal = {Methodology}, volume = {2}, number = {2}, pages = {57--64}, year = {2006}}`},
	"schonemann1966": {Citation: "Schönemann, P. H. (1966). A generalized solution of the orthogonal Procrustes problem. Psychometrika 31: 1–10.",
		BibTeX: `@article{schonemann1966, author = {Sch{\"o}nemann, Peter H.}, title = {A generalized solution of the orthogonal {Procrustes} problem}, journal = {Psychometrika}, volume = {31}, number = {1}, pages = {1--10}, year = {1966}}`},
	"westerhuis2000": {Citation: "Westerhuis, J. A., Gurden, S. P. & Smilde, A. K. (2000). Generalized contribution plots in multivariate statistical process monitoring. Chemometrics and Intelligent Laboratory Systems 51: 95–114.",
		BibTeX: `@article{westerhuis2000, author = {Westerhuis, Johan A. and Gurden, Stephen P. and Smilde, Age K.}, title = {Generalized contribution plots in multivariate statistical process monitoring}, journal = {Chemometrics and Intelligent Laboratory Systems}, volume = {51}, number = {1}, pages = {95--114}, year = {2000}}`},
	"miller1998": {Citation: "Miller, P., Swanson, R. E. & Heckler, C. E. (1998). Contribution plots: a missing link in multivariate quality control. Applied Mathematics and Computer Science 8: 775–792.",
		BibTeX: `@article{miller1998, author = {Miller, Paige and Swanson, Ronald E. and Heckler, Charles E.}, title = {Contribution plots: a missing link in multivariate quality control}, journal = {Applied Mathematics and Computer Science}, volume = {8}, number = {4}, pages = {775--792}, year = {1998}}`},
	"shewhart1931": {Citation: "Shewhart, W. A. (1931). Economic Control of Quality of Manufactured Product. Van Nostrand, New York.",
		BibTeX: `@book{shewhart1931, author = {Shewhart, Walter A.}, title = {Economic Control of Quality of Manufactured Product}, publisher = {Van Nostrand}, address = {New York}, year = {1931}}`},
	// Cited by check sources and messages rather than by the methods.
	// Verified against the publishers' pages or the papers' first pages
	// where noted "verified"; the others are from memory and agree with
	// the references in the code's comments.
	"peresneto2005": {Citation: "Peres-Neto, P. R., Jackson, D. A. & Somers, K. M. (2005). How many principal components? Stopping rules for determining the number of non-trivial axes revisited. Computational Statistics & Data Analysis 49: 974–997.", // from memory
		BibTeX: `@article{peresneto2005, author = {Peres-Neto, Pedro R. and Jackson, Donald A. and Somers, Keith M.}, title = {How many principal components? {S}topping rules for determining the number of non-trivial axes revisited}, journal = {Computational Statistics \& Data Analysis}, volume = {49}, number = {4}, pages = {974--997}, year = {2005}}`},
	"anderson1963": {Citation: "Anderson, T. W. (1963). Asymptotic theory for principal component analysis. Annals of Mathematical Statistics 34: 122–148.", // from memory
		BibTeX: `@article{anderson1963, author = {Anderson, Theodore W.}, title = {Asymptotic theory for principal component analysis}, journal = {Annals of Mathematical Statistics}, volume = {34}, number = {1}, pages = {122--148}, year = {1963}}`},
	"hubert2005": {Citation: "Hubert, M., Rousseeuw, P. J. & Vanden Branden, K. (2005). ROBPCA: a new approach to robust principal component analysis. Technometrics 47: 64–79.", // verified
		BibTeX: `@article{hubert2005, author = {Hubert, Mia and Rousseeuw, Peter J. and Vanden Branden, Karlien}, title = {{ROBPCA}: a new approach to robust principal component analysis}, journal = {Technometrics}, volume = {47}, number = {1}, pages = {64--79}, year = {2005}}`},
	"gorsuch1983": {Citation: "Gorsuch, R. L. (1983). Factor Analysis, 2nd edn. Lawrence Erlbaum, Hillsdale, NJ.", // verified
		BibTeX: `@book{gorsuch1983, author = {Gorsuch, Richard L.}, title = {Factor Analysis}, edition = {2nd}, publisher = {Lawrence Erlbaum}, address = {Hillsdale, NJ}, year = {1983}}`},
	"maccallum1999": {Citation: "MacCallum, R. C., Widaman, K. F., Zhang, S. & Hong, S. (1999). Sample size in factor analysis. Psychological Methods 4: 84–99.", // verified
		BibTeX: `@article{maccallum1999, author = {MacCallum, Robert C. and Widaman, Keith F. and Zhang, Shaobo and Hong, Sehee}, title = {Sample size in factor analysis}, journal = {Psychological Methods}, volume = {4}, number = {1}, pages = {84--99}, year = {1999}}`},
	"fisher1915": {Citation: "Fisher, R. A. (1915). Frequency distribution of the values of the correlation coefficient in samples from an indefinitely large population. Biometrika 10: 507–521.", // title, volume and first page verified; last page from memory
		BibTeX: `@article{fisher1915, author = {Fisher, Ronald A.}, title = {Frequency distribution of the values of the correlation coefficient in samples from an indefinitely large population}, journal = {Biometrika}, volume = {10}, number = {4}, pages = {507--521}, year = {1915}}`},
	"fisher1924": {Citation: "Fisher, R. A. (1924). The distribution of the partial correlation coefficient. Metron 3: 329–332.", // from memory
		BibTeX: `@article{fisher1924, author = {Fisher, Ronald A.}, title = {The distribution of the partial correlation coefficient}, journal = {Metron}, volume = {3}, pages = {329--332}, year = {1924}}`},
	"locantore1999": {Citation: "Locantore, N., Marron, J. S., Simpson, D. G., Tripoli, N., Zhang, J. T. & Cohen, K. L. (1999). Robust principal component analysis for functional data. Test 8: 1–73.", // from memory
		BibTeX: `@article{locantore1999, author = {Locantore, N. and Marron, J. S. and Simpson, D. G. and Tripoli, N. and Zhang, J. T. and Cohen, K. L.}, title = {Robust principal component analysis for functional data}, journal = {Test}, volume = {8}, number = {1}, pages = {1--73}, year = {1999}}`},
	"gabriel1971": {Citation: "Gabriel, K. R. (1971). The biplot graphic display of matrices with application to principal component analysis. Biometrika 58: 453–467.",
		BibTeX: `@article{gabriel1971, author = {Gabriel, K. Ruben}, title = {The biplot graphic display of matrices with application to principal component analysis}, journal = {Biometrika}, volume = {58}, number = {3}, pages = {453--467}, year = {1971}}`},
}

// citer collects the works a report cites, in order of first citation.
type citer struct {
	keys []string
	seen map[string]bool
}

func (c *citer) cite(keys ...string) {
	if c.seen == nil {
		c.seen = map[string]bool{}
	}
	for _, k := range keys {
		if _, ok := bibliography[k]; !ok {
			panic("report: unknown reference " + k)
		}
		if !c.seen[k] {
			c.seen[k] = true
			c.keys = append(c.keys, k)
		}
	}
}

func (c *citer) references() []Reference {
	out := make([]Reference, len(c.keys))
	for i, k := range c.keys {
		r := bibliography[k]
		r.Key = k
		out[i] = r
	}
	return out
}

// methods writes the methods paragraph, ready to paste, and the references
// it cites. The paragraph is a sequence of whole sentences, one builder
// each, so that every combination of options reads as English: a builder
// that has nothing to say returns "". A new option (a new exclusion, a new
// rule) gets its own sentence rather than a clause spliced into another.
func methods(res *analysis.Result, meta Meta) (string, []Reference) {
	var sentences []string
	add := func(s ...string) {
		for _, x := range s {
			if x != "" {
				sentences = append(sentences, x)
			}
		}
	}
	add(dataSentence(res, meta))
	add(layoutSentence(res.Table))
	add(rowsSentence(res.Table), exclusionMethodSentence(res))
	add(exclusionSentences(res.Table.DroppedVariables)...)
	add(censoringSentence(res.Table))
	add(preprocessingSentence(res), imputationSentence(res.Table), iterativeImputationSentence(res), missingListSentence(res.Table))
	add(decompositionSentence(res), verificationSentence(res))
	add(componentSentences(res)...)
	add(outlierSentences(res)...)
	add(whatIfMethodSentence(res))
	add(adequacySentence(res))
	add(stabilitySentences(res)...)
	add(fmt.Sprintf("Random streams were seeded with %d.", res.Options.Seed))
	text := strings.Join(sentences, " ")
	return text, referencesIn(text)
}

func dataSentence(res *analysis.Result, meta Meta) string {
	t := res.Table
	sheet := ""
	if t.Sheet != "" {
		sheet = "sheet " + strconv.Quote(t.Sheet) + ", "
	}
	return fmt.Sprintf("Principal component analysis (Jolliffe & Cadima 2016) was carried out with pcqc %s on %s and %s of %s (%sSHA-256 %s…).",
		meta.Version, countNoun(t.Rows(), "sample"), countNoun(len(t.Variables), "variable"), t.File, sheet, t.SHA256[:min(12, len(t.SHA256))])
}

// layoutSentence says how the text around the table was read, when it
// was more than a header and rows of plain numbers.
func layoutSentence(t *intake.Table) string {
	var c []string
	if t.SkippedLines > 0 {
		first := fmt.Sprintf("the first %d lines of the file were skipped", t.SkippedLines)
		if t.SkippedLines == 1 {
			first = "the first line of the file was skipped"
		}
		c = append(c, first)
	}
	if t.CommentLines > 0 {
		c = append(c, fmt.Sprintf("%s %s ignored", countNoun(t.CommentLines, "comment line"), wasWere(t.CommentLines)))
	}
	if hasUnits(t) {
		c = append(c, "units were read from the row under the header")
	}
	if t.GroupedNumbers > 0 {
		c = append(c, fmt.Sprintf("thousands separators were removed from %s", countNoun(t.GroupedNumbers, "value")))
	}
	switch len(c) {
	case 0:
		return ""
	case 1:
		return "In reading the file, " + c[0] + "."
	}
	return "In reading the file, " + strings.Join(c[:len(c)-1], ", ") + " and " + c[len(c)-1] + "."
}

func wasWere(n int) string {
	if n == 1 {
		return "was"
	}
	return "were"
}

// rowsSentence says which samples were removed for missing values.
func rowsSentence(t *intake.Table) string {
	switch n := t.RowsDropped; {
	case n == 1:
		return "Before the analysis, one sample with missing values was removed."
	case n > 1:
		return fmt.Sprintf("Before the analysis, %d samples with missing values were removed.", n)
	}
	return ""
}

// imputationSentence says which missing values were replaced. Means are
// taken of the transformed values (analysis.ReadTable imputes after the
// transform), which the sentence says when there is a transform.
func imputationSentence(t *intake.Table) string {
	n := t.ImputedCells
	if n == 0 || t.Missing == intake.MissingIterative {
		return ""
	}
	scale := ""
	if t.Transform != intake.TransformNone && t.Transform != "" {
		scale = " on the transformed scale"
	}
	if n == 1 {
		return fmt.Sprintf("The one missing value was replaced by the mean of its variable%s, before centring.", scale)
	}
	return fmt.Sprintf("The %d missing values were replaced by the mean of their variable%s, before centring.", n, scale)
}

// missingListSentence says where the dropped samples or the imputed cells
// are listed, with their counts, so that a reader of the methods can find
// which data the analysis did not observe.
func missingListSentence(t *intake.Table) string {
	switch {
	case t.MissingCells == 0:
		return ""
	case t.RowsDropped == 1:
		return fmt.Sprintf("The sample dropped and the variables it lacked are listed in the Data section and in %s.", missingBySampleCSV)
	case t.RowsDropped > 1:
		return fmt.Sprintf("The %d samples dropped and the variables each lacked are listed in the Data section and in %s.",
			t.RowsDropped, missingBySampleCSV)
	case t.ImputedCells > 0:
		what := fmt.Sprintf("The %d cells imputed, with the values used, are", t.ImputedCells)
		if t.ImputedCells == 1 {
			what = "The cell imputed, with the value used, is"
		}
		return fmt.Sprintf("%s listed in the Data section and in %s; the missing shares per variable and per sample are in %s and %s.",
			what, imputedCellsCSV, missingByVariableCSV, missingBySampleCSV)
	}
	return ""
}

// exclusionSentences list every variable left out, grouped by reason, in
// full: a methods paragraph is pasted into a paper, where "and 5 more"
// would leave the reader guessing.
func exclusionSentences(dropped []intake.DroppedVariable) []string {
	type group struct {
		reason string
		names  []string
	}
	var groups []*group
	byReason := map[string]*group{}
	for _, v := range dropped {
		reason := v.Reason
		switch {
		case strings.HasPrefix(reason, "constant"):
			reason = "constant"
		case strings.Contains(reason, "--drop"):
			reason = "drop"
		}
		g := byReason[reason]
		if g == nil {
			g = &group{reason: reason}
			byReason[reason] = g
			groups = append(groups, g)
		}
		g.names = append(g.names, v.Name)
	}
	var out []string
	for _, g := range groups {
		one := len(g.names) == 1
		noun := map[bool]string{true: "variable", false: "variables"}[one]
		verb := map[bool]string{true: "was", false: "were"}[one]
		names := joinAnd(g.names)
		switch g.reason {
		case "constant":
			out = append(out, fmt.Sprintf("The constant %s %s %s left out, having no variance to analyse.", noun, names, verb))
		case "drop":
			out = append(out, fmt.Sprintf("The %s %s %s left out at the user's request (--drop).", noun, names, verb))
		default:
			out = append(out, fmt.Sprintf("The %s %s %s left out: %s.", noun, names, verb, strings.TrimSuffix(g.reason, ".")))
		}
	}
	return out
}

func preprocessingSentence(res *analysis.Result) string {
	var b strings.Builder
	switch res.Table.Transform {
	case intake.TransformLog:
		b.WriteString("Every value was replaced by its natural logarithm, and every variable was then mean-centred")
	case intake.TransformLog10:
		b.WriteString("Every value was replaced by its base-10 logarithm, and every variable was then mean-centred")
	case intake.TransformLog1p:
		b.WriteString("Every value x was replaced by log(1 + x), and every variable was then mean-centred")
	default:
		b.WriteString("Every variable was mean-centred")
	}
	switch res.Prep.Scaling {
	case analysis.ScaleUnit:
		b.WriteString(" and scaled to unit variance (divided by its sample standard deviation, n − 1).")
	case analysis.ScalePareto:
		b.WriteString(" and Pareto-scaled (divided by the square root of its standard deviation; van den Berg et al. 2006).")
	case analysis.ScaleRange:
		b.WriteString(" and range-scaled (divided by its range; van den Berg et al. 2006).")
	default:
		b.WriteString(" but not scaled, so that the variables keep their units (covariance PCA).")
	}
	return b.String()
}

func decompositionSentence(res *analysis.Result) string {
	if res.Decomp.Method == analysis.MethodTallQR {
		return "Components were obtained by singular value decomposition of the preprocessed matrix, through a blocked Householder QR factorisation (Demmel et al. 2012), with eigenvalues λ = s²/(n − 1)."
	}
	return "Components were obtained by singular value decomposition of the preprocessed matrix, through its n × n LQ factor, with eigenvalues λ = s²/(n − 1)."
}

func verificationSentence(res *analysis.Result) string {
	p := res.Properties
	return fmt.Sprintf("Correctness was verified on the result: column means below %s of the largest standard deviation, loadings orthonormal to %s, scores uncorrelated to %s, and eigenvalues equal to score variances to %s (relative).",
		g4(p.CenteringError), g4(p.OrthonormalityError), g4(p.ScoreCorrelation), g4(p.VarianceMismatch))
}

// ruleMethod describes the rule in force as the means of a choice: "…
// chosen by <ruleMethod>".
func ruleMethod(res *analysis.Result) string {
	c := res.Counts
	switch res.Rule.Kind {
	case analysis.RuleParallel:
		return "parallel analysis (Horn 1965), which keeps the leading components whose eigenvalues are significantly above those of column-wise permuted data at 5 % (Glorfeld 1995)"
	case analysis.RuleCV:
		return fmt.Sprintf("element-wise %d-fold cross-validation (Bro et al. 2008) on %s, as the fewest components within one standard error of the smallest PRESS", c.CV.Folds, countNoun(c.CV.Rows, "row"))
	case analysis.RuleBrokenStick:
		return "the broken-stick rule (Frontier 1976; Jackson 1993), which keeps the leading components whose share of the variance exceeds the share expected under the broken stick"
	case analysis.RuleKaiser:
		return "the Kaiser criterion (Kaiser 1960), which keeps the components whose eigenvalue exceeds 1, the variance of one unit-scaled variable"
	case analysis.RuleVariance:
		return fmt.Sprintf("the smallest number of components whose cumulative share of the variance reaches %s %%", strconv.FormatFloat(100*res.Rule.Variance, 'g', -1, 64))
	}
	return res.Rule.Describe()
}

// otherRuleName names a rule that was not in force, for the comparison.
func otherRuleName(res *analysis.Result, rc analysis.RuleCount) string {
	c := res.Counts
	switch rc.Rule {
	case analysis.RuleParallel:
		return fmt.Sprintf("parallel analysis (Horn 1965; %d permutations)", c.Parallel.Permutations)
	case analysis.RuleCV:
		return fmt.Sprintf("element-wise %d-fold cross-validation (Bro et al. 2008)", c.CV.Folds)
	case analysis.RuleBrokenStick:
		return "the broken-stick rule (Frontier 1976)"
	case analysis.RuleKaiser:
		return "the Kaiser criterion (Kaiser 1960)"
	case analysis.RuleVariance:
		return fmt.Sprintf("a cumulative share of %s of the variance", strings.TrimPrefix(strings.TrimPrefix(rc.Note, "≥"), " "))
	}
	return string(rc.Rule)
}

// componentSentences say how many components were retained and why, what
// the other rules would have kept, and how much variance is retained.
func componentSentences(res *analysis.Result) []string {
	var out []string
	k := res.Retained
	chosen := k
	switch {
	case res.Rule.Kind == analysis.RuleFixed:
		out = append(out, fmt.Sprintf("The analysis retained %s, the number set by the user.", countNoun(k, "component")))
	case res.NoStructure:
		chosen = 0
		out = append(out, fmt.Sprintf("No component was retained by %s, so PC1 is kept for reference only.", ruleMethod(res)))
	default:
		out = append(out, fmt.Sprintf("The analysis retained %s, chosen by %s.", countNoun(k, "component"), ruleMethod(res)))
	}
	if p := res.Counts.Parallel; res.Rule.Kind == analysis.RuleParallel {
		s := fmt.Sprintf("Permutations were run in batches of %d until 99 %% Clopper–Pearson bounds (Clopper & Pearson 1934) settled every decision, which took %d of at most %d", analysis.ParallelBatch, p.Permutations, p.Cap)
		if p.Borderline >= 0 {
			s += fmt.Sprintf("; PC%d stayed borderline and was not counted", p.Borderline+1)
		}
		out = append(out, s+".")
	}

	// The other rules, grouped by the count they give: the count in
	// force first, then the others from fewest to most.
	groups := map[int][]string{}
	var counts []int
	for _, rc := range res.Counts.Counts {
		if rc.Rule == res.Rule.Kind || !rc.Applies {
			continue
		}
		if _, ok := groups[rc.Count]; !ok {
			counts = append(counts, rc.Count)
		}
		groups[rc.Count] = append(groups[rc.Count], otherRuleName(res, rc))
	}
	slices.SortFunc(counts, func(a, b int) int {
		if (a == chosen) != (b == chosen) {
			if a == chosen {
				return -1
			}
			return 1
		}
		return a - b
	})
	// The noun goes with the first number written: "… would have
	// retained 1 component; … would have retained 4."
	nounGiven := false
	number := func(n int) string {
		if nounGiven {
			return strconv.Itoa(n)
		}
		nounGiven = true
		return countNoun(n, "component")
	}
	var parts []string
	for _, n := range counts {
		var kept string
		switch {
		case n == 0 && chosen == 0:
			kept = "would also have retained none"
		case n == 0:
			kept = "would have retained none"
		case n == chosen && res.Rule.Kind == analysis.RuleFixed:
			kept = "would have retained the same number"
		case n == chosen:
			kept = "would also have retained " + number(n)
		default:
			kept = "would have retained " + number(n)
		}
		parts = append(parts, joinAnd(groups[n])+" "+kept)
	}
	if len(parts) > 0 {
		out = append(out, "For comparison, "+strings.Join(parts, "; ")+".")
	}

	pct := Percentages(res.Decomp.Eigenvalues)
	cum := 0.0
	shares := make([]string, k)
	for a := range k {
		cum += pct[a]
		shares[a] = fmt.Sprintf("PC%d %.1f %%", a+1, pct[a])
	}
	if k == 1 {
		out = append(out, fmt.Sprintf("The retained component explains %.1f %% of the total variance.", cum))
	} else {
		out = append(out, fmt.Sprintf("The retained components explain %.1f %% of the total variance (%s).", cum, strings.Join(shares, ", ")))
	}
	return out
}

func outlierSentences(res *analysis.Result) []string {
	l := res.Samples.Limits
	var out []string
	s := fmt.Sprintf("Samples were screened with Hotelling's T² (Hotelling 1931) against the beta-distribution limits for the samples that built the model (Tracy et al. 1992; %s at 95 %%, %s at 99 %%)", g4(l.T2_95), g4(l.T2_99))
	switch l.QMethod {
	case analysis.QJacksonMudholkar:
		s += fmt.Sprintf(" and with the Q residual against Jackson & Mudholkar's (1979) limits (%s at 95 %%, %s at 99 %%).", g4(l.Q95), g4(l.Q99))
	case analysis.QBox:
		s += fmt.Sprintf(" and with the Q residual against the limits of Box's (1954) χ² approximation (%s at 95 %%, %s at 99 %%), the Jackson & Mudholkar (1979) formula being undefined for these eigenvalues.", g4(l.Q95), g4(l.Q99))
	default:
		s += "; every component was retained, so no variance is left for a Q residual."
	}
	out = append(out, s)
	if l.QMethod == analysis.QJacksonMudholkar || l.QMethod == analysis.QBox {
		out = append(out, fmt.Sprintf("Both were judged family-wise, with Šidák's (1967) correction for the %s at α = %g (limits: T² %s, Q %s), and by a binomial tail test of the count beyond the 95 %% limit.",
			countNoun(res.Decomp.Rows, "sample"), analysis.FamilyAlpha, g4(l.T2Family), g4(l.QFamily)))
	} else {
		out = append(out, fmt.Sprintf("T² was judged family-wise, with Šidák's (1967) correction for the %s at α = %g (limit %s), and by a binomial tail test of the count beyond the 95 %% limit.",
			countNoun(res.Decomp.Rows, "sample"), analysis.FamilyAlpha, g4(l.T2Family)))
	}
	if ph := l.T2Phase; len(ph.SetAside) > 0 {
		out = append(out, fmt.Sprintf("Samples beyond the T² limit were set aside and the component variances estimated again from the other %s until the set settled, each set-aside sample being judged as a new one (Phase I practice; Sullivan & Woodall 1996).", countNoun(ph.Kept, "sample")))
	}
	// Only where the fitted tail raised a limit.
	if ct := l.Components; ct.Fitted() && (l.T2FamilyComponent > l.T2FamilyNormal || l.QFamilyComponent > l.QFamilyNormal) {
		out = append(out, fmt.Sprintf("The components' tail weight was estimated from the retained scores (Student t by maximum likelihood; Lange et al. 1989) and from the variance of Q (ν = %s), and each family-wise limit was taken as the larger of the normal-theory limit and the tail of a sum of Student t terms with that ν (Embrechts et al. 1997).", g4(ct.DF)))
	}
	if inf := res.Samples.Influence; inf.Angle != nil {
		out = append(out, "Each sample's influence is the largest principal angle (Björck & Golub 1973) between the retained subspace and the one refitted without that sample, preprocessing included, computed exactly for every sample.")
	}
	return out
}

func adequacySentence(res *analysis.Result) string {
	ad := res.Adequacy
	var parts []string
	switch {
	case ad.Bartlett.Computed && ad.Bartlett.Singular:
		parts = append(parts, "Bartlett's test of sphericity (Bartlett 1950, 1951; the correlation matrix is singular, some variables being exact combinations of others)")
	case ad.Bartlett.Computed:
		parts = append(parts, fmt.Sprintf("Bartlett's test of sphericity (Bartlett 1950, 1951; χ² = %s, df = %d, %s)", g4(ad.Bartlett.Chi2), ad.Bartlett.DF, pText(ad.Bartlett.P)))
	}
	if ad.KMO.Computed {
		parts = append(parts, fmt.Sprintf("the Kaiser–Meyer–Olkin measure of sampling adequacy (Kaiser 1970; %.2f, %s in Kaiser's (1974) terms)", ad.KMO.Overall, analysis.KMOLabel(ad.KMO.Overall)))
	}
	parts = append(parts,
		"the skewness of each variable (Joanes & Gill 1998; flagged beyond ±2, after West et al. 1995)",
		"the separation of neighbouring eigenvalues (North et al. 1982)")
	return fmt.Sprintf("Data adequacy was assessed with %s.", joinAnd(parts))
}

func stabilitySentences(res *analysis.Result) []string {
	st := res.Stability
	if st.Used == 0 {
		if res.Options.Bootstrap <= 0 {
			return []string{"Loading stability was not assessed: no bootstrap was run (--bootstrap 0)."}
		}
		return nil
	}
	s := fmt.Sprintf("Loading stability was assessed with %d bootstrap resamples (Efron 1979) of the whole pipeline, each redoing the preprocessing", st.Used)
	if res.Decomp.Rows < res.Decomp.Vars {
		s += ", computed exactly in the n-dimensional row space (Fisher et al. 2016)"
	}
	if st.Scheme == analysis.SchemeBLB {
		s = fmt.Sprintf("Loading stability was assessed with the bag of little bootstraps (Kleiner et al. 2014), used from %d rows: %d subsets of %d rows, each with %d resamples weighted to the full %d rows, redoing the preprocessing; intervals are the subsets' averaged quantiles about their own estimates, placed about the full-data estimate, and no BCa intervals are given", st.SwitchRows, st.Subsets, st.SubsetSize, st.PerSubset, res.Decomp.Rows)
	}
	worst := 1.0
	for _, cs := range st.Components {
		worst = min(worst, cs.CongruenceP5)
	}
	return []string{s + ".",
		fmt.Sprintf("Resample loadings were sign-aligned and, separately, Procrustes-rotated (Schönemann 1966) to the reference loadings and compared with them by Tucker's congruence coefficient (Tucker 1951); its 5th percentile was at least %.3f for every retained component, against the thresholds of Lorenzo-Seva & ten Berge (2006), 0.95 for equal and 0.85 for fair similarity.", worst)}
}

// countNoun writes a count with its noun, singular for one.
func countNoun(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return strconv.Itoa(n) + " " + noun + "s"
}

func pText(p float64) string {
	if p < 1e-16 {
		return "p < 1e-16"
	}
	return "p = " + g4(p)
}

func joinAnd(parts []string) string {
	switch len(parts) {
	case 0:
		return ""
	case 1:
		return parts[0]
	}
	return strings.Join(parts[:len(parts)-1], ", ") + " and " + parts[len(parts)-1]
}

// BibTeX returns references.bib for the cited works.
func BibTeX(refs []Reference) []byte {
	var b strings.Builder
	b.WriteString("% References cited in the pcqc report.\n\n")
	for _, r := range refs {
		b.WriteString(r.BibTeX)
		b.WriteString("\n\n")
	}
	return []byte(b.String())
}
